/**
 * One MailService per running app: where links in messages point, the outbox sender and its
 * transport, who may open the development mailbox, and the rate limits of the mail-sending routes.
 *
 * Routes never send mail themselves. They insert an outbox row (`enqueue`, or `enqueueMail` inside
 * their own transaction followed by `wake()`), or hand work that may fail to `background()`, whose
 * failures are logged and never reach the response.
 */
import type { Transporter } from 'nodemailer';
import type { Database, Transaction } from '../db/client';
import type { Logger } from '../log';
import type { FakeSmtp } from './fake-smtp';
import { enqueueMail, OutboxSender, type OutgoingMail, type SenderOptions } from './outbox';

export interface RateLimit {
  windowMs: number;
  limit: number;
}

export interface MailRateLimits {
  /** Password-reset requests per client address. */
  resetPerAddress: RateLimit;
  /** Password-reset requests per e-mail address asked about (so nobody is flooded with links). */
  resetPerEmail: RateLimit;
  /** Invitations sent per signed-in owner. */
  invitationsPerUser: RateLimit;
  /** Uses of mailed tokens (look up, accept, sign up, set a password) per client address. */
  tokenUsePerAddress: RateLimit;
}

const minutes = (n: number) => n * 60 * 1000;

export const defaultMailRateLimits: MailRateLimits = {
  resetPerAddress: { windowMs: minutes(15), limit: 10 },
  resetPerEmail: { windowMs: minutes(60), limit: 3 },
  invitationsPerUser: { windowMs: minutes(60), limit: 30 },
  tokenUsePerAddress: { windowMs: minutes(15), limit: 60 },
};

export interface MailServiceOptions {
  db: Database;
  logger: Logger;
  /** Null: messages are queued but not delivered (an app built without mail, e.g. in unrelated tests). */
  transport?: Transporter | null;
  from?: string;
  /** Base of links in messages; may be set later with `useBaseUrl()` once the server listens. */
  baseUrl?: string | null;
  siteAdmins?: readonly string[];
  /** The local mail server is in use and this is not production: the mailbox page works. */
  mailboxEnabled?: boolean;
  sender?: Omit<SenderOptions, 'db' | 'logger' | 'transport' | 'from'>;
  limits?: Partial<MailRateLimits>;
  /** The local mail server, closed with the service. */
  fake?: FakeSmtp | null;
  /** Validity of invitation and password-reset links. */
  invitationTtlMs?: number;
  resetTtlMs?: number;
}

export class MailService {
  readonly db: Database;
  readonly logger: Logger;
  readonly sender: OutboxSender;
  readonly limits: MailRateLimits;
  readonly mailboxEnabled: boolean;
  readonly fake: FakeSmtp | null;
  readonly invitationTtlMs: number;
  readonly resetTtlMs: number;
  private readonly transport: Transporter | null;
  private readonly siteAdmins: Set<string>;
  private base: string | null;
  private readonly tasks = new Set<Promise<void>>();
  private readonly stopHooks: Array<() => void> = [];
  private started = false;

  constructor(options: MailServiceOptions) {
    this.db = options.db;
    this.logger = options.logger;
    this.transport = options.transport ?? null;
    this.sender = new OutboxSender({
      ...options.sender,
      db: options.db,
      logger: options.logger,
      transport: this.transport,
      from: options.from ?? 'Spreadproof <no-reply@spreadproof.invalid>',
    });
    this.limits = { ...defaultMailRateLimits, ...options.limits };
    this.siteAdmins = new Set((options.siteAdmins ?? []).map((e) => e.trim().toLowerCase()));
    this.mailboxEnabled = options.mailboxEnabled ?? false;
    this.fake = options.fake ?? null;
    this.base = options.baseUrl ? options.baseUrl.replace(/\/+$/, '') : null;
    this.invitationTtlMs = options.invitationTtlMs ?? 7 * 24 * 60 * 60 * 1000;
    this.resetTtlMs = options.resetTtlMs ?? 60 * 60 * 1000;
  }

  /** Sets the base of links unless one was configured (APP_BASE_URL wins over the listening address). */
  useBaseUrl(url: string): void {
    this.base ??= url.replace(/\/+$/, '');
  }

  get baseUrl(): string {
    return this.base ?? 'http://127.0.0.1:4300';
  }

  /** An absolute link into the client app, e.g. `link('/revisions/…')`. */
  link(path: string): string {
    return `${this.baseUrl}${path.startsWith('/') ? path : `/${path}`}`;
  }

  isSiteAdmin(email: string): boolean {
    return this.siteAdmins.has(email.trim().toLowerCase());
  }

  /** Queues a message now (outside any transaction) and wakes the sender. */
  async enqueue(mail: OutgoingMail): Promise<string | null> {
    const id = await enqueueMail(this.db, mail);
    this.wake();
    return id;
  }

  /** Queues a message inside the caller's transaction; call `wake()` after it commits. */
  enqueueIn(tx: Transaction, mail: OutgoingMail): Promise<string | null> {
    return enqueueMail(tx, mail);
  }

  wake(): void {
    this.sender.wake();
  }

  /**
   * Runs work that must not hold up or fail a response (notifications, work done after answering).
   * Failures are logged with `what`.
   */
  background(what: string, task: () => Promise<unknown>): void {
    const run: Promise<void> = Promise.resolve()
      .then(task)
      .then(
        () => undefined,
        (error: unknown) => this.logger.error({ err: error, task: what }, 'mail task failed'),
      )
      .finally(() => this.tasks.delete(run));
    this.tasks.add(run);
  }

  /** Waits for background tasks, then delivers every due message (tests, shutdown). */
  async flush(): Promise<void> {
    while (this.tasks.size > 0) await Promise.all([...this.tasks]);
    await this.sender.drain();
  }

  /** Registers something to undo at close (an event subscription). */
  onClose(hook: () => void): void {
    this.stopHooks.push(hook);
  }

  get isStarted(): boolean {
    return this.started;
  }

  /** Starts the background sender (no-op without a transport). */
  start(): void {
    this.started = true;
    this.sender.start();
  }

  async close(): Promise<void> {
    this.started = false;
    for (const hook of this.stopHooks.splice(0)) hook();
    await Promise.allSettled([...this.tasks]);
    await this.sender.stop();
    this.transport?.close();
    await this.fake?.close();
  }
}
