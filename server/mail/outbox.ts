/**
 * The outbox: requests only insert a row into `mail_outbox`; a background sender delivers the rows
 * over SMTP, retries failures with growing delays, and logs every failure with pino. So a slow or
 * broken mail server never slows down or fails the request that caused a message.
 *
 * Claiming rows (`FOR UPDATE SKIP LOCKED`) moves their next attempt forward by a lease, so several
 * senders (or a sender that crashed mid-delivery) never deliver a row twice within the lease and
 * never lose one: an unfinished row is simply due again when the lease runs out.
 */
import { and, asc, eq, inArray, lte, sql } from 'drizzle-orm';
import type { Transporter } from 'nodemailer';
import { mailOutbox, type MailOutboxRow } from '../../schema/index';
import type { Database, Transaction } from '../db/client';
import type { Logger } from '../log';

export type MailKind = MailOutboxRow['kind'];

export interface OutgoingMail {
  kind: MailKind;
  to: string;
  recipientUserId?: string | null;
  subject: string;
  text: string;
  html: string;
  /** Enqueueing the same key again is a no-op (one notification per event and recipient). */
  dedupeKey?: string;
}

/** Inserts a message; returns its id, or null when a message with the same dedupe key exists. */
export async function enqueueMail(db: Database | Transaction, mail: OutgoingMail): Promise<string | null> {
  const rows = await db
    .insert(mailOutbox)
    .values({
      kind: mail.kind,
      recipient: mail.to,
      recipientUserId: mail.recipientUserId ?? null,
      subject: mail.subject,
      textBody: mail.text,
      htmlBody: mail.html,
      dedupeKey: mail.dedupeKey ?? null,
    })
    .onConflictDoNothing({ target: mailOutbox.dedupeKey })
    .returning({ id: mailOutbox.id });
  return rows[0]?.id ?? null;
}

export interface SenderOptions {
  db: Database;
  logger: Logger;
  /** Null: messages stay queued (no transport configured). */
  transport: Transporter | null;
  from: string;
  /** How often the sender looks for due rows when nobody wakes it (default 5 s). */
  pollMs?: number;
  batchSize?: number;
  /** How long a claimed row is reserved for one delivery attempt (default 2 min). */
  leaseMs?: number;
  /** Attempts before a message is given up (default 8: about 1.5 days of retrying). */
  maxAttempts?: number;
  /** Delay before attempt n + 1 after n failed attempts (default 30 s × 4^(n−1), at most 6 h). */
  retryDelayMs?: (failedAttempts: number) => number;
}

export const defaultRetryDelayMs = (failedAttempts: number) =>
  Math.min(30_000 * 4 ** Math.max(0, failedAttempts - 1), 6 * 60 * 60 * 1000);

export class OutboxSender {
  private timer: NodeJS.Timeout | null = null;
  private running: Promise<number> | null = null;
  private rerun = false;
  private stopped = true;
  private readonly pollMs: number;
  private readonly batchSize: number;
  private readonly leaseMs: number;
  private readonly maxAttempts: number;
  private readonly retryDelayMs: (failedAttempts: number) => number;

  constructor(private readonly options: SenderOptions) {
    this.pollMs = options.pollMs ?? 5000;
    this.batchSize = options.batchSize ?? 10;
    this.leaseMs = options.leaseMs ?? 120_000;
    this.maxAttempts = options.maxAttempts ?? 8;
    this.retryDelayMs = options.retryDelayMs ?? defaultRetryDelayMs;
  }

  get hasTransport(): boolean {
    return this.options.transport !== null;
  }

  start(): void {
    if (!this.stopped || !this.options.transport) return;
    this.stopped = false;
    this.schedule(0);
  }

  async stop(): Promise<void> {
    this.stopped = true;
    if (this.timer) clearTimeout(this.timer);
    this.timer = null;
    await this.running?.catch(() => undefined);
  }

  /** Asks for a delivery round now (after a message was enqueued). */
  wake(): void {
    if (this.stopped) return;
    if (this.running) {
      this.rerun = true;
      return;
    }
    this.schedule(0);
  }

  private schedule(delay: number): void {
    if (this.stopped) return;
    if (this.timer) clearTimeout(this.timer);
    this.timer = setTimeout(() => {
      this.timer = null;
      void this.round().finally(() => {
        if (this.rerun) {
          this.rerun = false;
          this.schedule(0);
        } else {
          this.schedule(this.pollMs);
        }
      });
    }, delay);
    this.timer.unref();
  }

  private round(): Promise<number> {
    this.running ??= this.deliverDue()
      .catch((error: unknown) => {
        // The database is away (restart, network); the next round tries again.
        this.options.logger.warn({ err: error }, 'mail sender could not read the outbox');
        return 0;
      })
      .finally(() => {
        this.running = null;
      });
    return this.running;
  }

  /** Delivers every due message (in batches) and returns how many were attempted. */
  async drain(): Promise<number> {
    if (!this.options.transport) return 0;
    let total = 0;
    for (;;) {
      // Wait for a round already in flight instead of racing it for the same rows.
      if (this.running) await this.running;
      const attempted = await this.round();
      total += attempted;
      if (attempted === 0) return total;
    }
  }

  private async claim(): Promise<MailOutboxRow[]> {
    const { db } = this.options;
    const due = db
      .select({ id: mailOutbox.id })
      .from(mailOutbox)
      .where(and(eq(mailOutbox.status, 'pending'), lte(mailOutbox.nextAttemptAt, sql`now()`)))
      .orderBy(asc(mailOutbox.nextAttemptAt), asc(mailOutbox.createdAt))
      .limit(this.batchSize)
      .for('update', { skipLocked: true });
    return db
      .update(mailOutbox)
      .set({
        attempts: sql`${mailOutbox.attempts} + 1`,
        nextAttemptAt: sql`now() + ${this.leaseMs} * interval '1 millisecond'`,
      })
      .where(inArray(mailOutbox.id, due))
      .returning();
  }

  private async deliverDue(): Promise<number> {
    let attempted = 0;
    for (;;) {
      const rows = await this.claim();
      if (rows.length === 0) return attempted;
      for (const row of rows) {
        attempted += 1;
        await this.deliver(row);
      }
      if (rows.length < this.batchSize) return attempted;
    }
  }

  private async deliver(row: MailOutboxRow): Promise<void> {
    const { db, logger, transport, from } = this.options;
    if (!transport) return;
    try {
      const info = await transport.sendMail({
        from,
        to: row.recipient,
        subject: row.subject,
        text: row.textBody ?? '',
        html: row.htmlBody ?? undefined,
        headers: { 'X-Spreadproof-Kind': row.kind, 'Auto-Submitted': 'auto-generated' },
      });
      await db
        .update(mailOutbox)
        .set({ status: 'sent', sentAt: sql`now()`, messageId: info.messageId ?? null, lastError: null, textBody: null, htmlBody: null })
        .where(eq(mailOutbox.id, row.id));
      logger.info({ mailId: row.id, kind: row.kind, attempts: row.attempts }, 'mail sent');
    } catch (error) {
      const message = error instanceof Error ? error.message : String(error);
      if (row.attempts >= this.maxAttempts) {
        await db
          .update(mailOutbox)
          .set({ status: 'failed', lastError: message.slice(0, 2000), textBody: null, htmlBody: null })
          .where(eq(mailOutbox.id, row.id));
        logger.error({ mailId: row.id, kind: row.kind, attempts: row.attempts, err: error }, 'mail given up after repeated failures');
      } else {
        const delay = this.retryDelayMs(row.attempts);
        await db
          .update(mailOutbox)
          .set({ lastError: message.slice(0, 2000), nextAttemptAt: sql`now() + ${delay} * interval '1 millisecond'` })
          .where(eq(mailOutbox.id, row.id));
        logger.warn({ mailId: row.id, kind: row.kind, attempts: row.attempts, retryInMs: delay, err: error }, 'mail delivery failed; will retry');
      }
    }
  }
}
