/**
 * For the mail suites: an in-process app whose mail goes over real SMTP to the local mail server
 * (server/mail/fake-smtp.ts) on a free loopback port, exactly as under `npm start`, and a reader of
 * the messages that server received and stored.
 *
 *     const env = await openMailTestApp();
 *     ... requests through env.harness.app ...
 *     const [message] = await env.inbox('someone@example.test');   // flushes the outbox first
 *     const token = tokenFromLink(message, '/invitation');
 */
import { expect } from 'chai';
import { asc, eq, sql } from 'drizzle-orm';
import nodemailer, { type Transporter } from 'nodemailer';
import { devMailbox, type DevMailboxRow } from '../../schema/index';
import { createLogger, type Logger } from '../../server/log';
import { startFakeSmtp, type FakeSmtp } from '../../server/mail/fake-smtp';
import { subscribeToReviewEvents } from '../../server/notifications/notify';
import { MailService, type MailServiceOptions } from '../../server/mail/service';
import { openDatabase } from '../../server/db/client';
import { suiteDatabaseUrl } from '../support/db';
import { openTestApp, type AppUnderTest } from './support';

export const testBaseUrl = 'http://127.0.0.1:4399';

/** SMTP to the local mail server, as `npm start` sets it up. */
export const fakeTransport = (fake: FakeSmtp): Transporter =>
  nodemailer.createTransport({ host: fake.host, port: fake.port, secure: false, ignoreTLS: true });

export interface MailTestEnv {
  harness: AppUnderTest;
  mail: MailService;
  fake: FakeSmtp;
  /** Delivers everything due, then returns the stored messages to `address`, oldest first. */
  inbox(address: string): Promise<DevMailboxRow[]>;
  close(): Promise<void>;
}

export async function openMailTestApp(
  options: Partial<Pick<MailServiceOptions, 'limits' | 'sender' | 'siteAdmins' | 'mailboxEnabled' | 'resetTtlMs' | 'invitationTtlMs'>> & {
    logger?: Logger;
    /** Instead of SMTP to the local mail server (e.g. a server that never answers). */
    transport?: Transporter;
  } = {},
): Promise<MailTestEnv> {
  const logger = options.logger ?? createLogger('silent');
  // The mail service needs the database before the app exists: a handle of its own on the run's database.
  const database = openDatabase(await suiteDatabaseUrl(), { max: 3 });
  const fake = await startFakeSmtp({ db: database.db, logger });
  const transport = options.transport ?? fakeTransport(fake);
  const mail = new MailService({
    db: database.db,
    logger,
    transport,
    fake,
    baseUrl: testBaseUrl,
    from: 'Spreadproof test <no-reply@spreadproof.invalid>',
    siteAdmins: options.siteAdmins ?? [],
    mailboxEnabled: options.mailboxEnabled ?? true,
    limits: options.limits,
    resetTtlMs: options.resetTtlMs,
    invitationTtlMs: options.invitationTtlMs,
    // Quick polling, quick retries: the suites wait with flush() rather than on the clock.
    sender: { pollMs: 50, retryDelayMs: () => 60_000, ...options.sender },
  });
  subscribeToReviewEvents(mail);
  mail.start();
  const harness = await openTestApp({ mail, logger });
  return {
    harness,
    mail,
    fake,
    async inbox(address) {
      await mail.flush();
      return database.db
        .select()
        .from(devMailbox)
        .where(sql`${address.toLowerCase()} = any(${devMailbox.envelopeTo})`)
        .orderBy(asc(devMailbox.receivedAt));
    },
    async close() {
      await mail.close();
      await harness.close();
      await database.close();
    },
  };
}

/** The one link in a message's text that starts with `${testBaseUrl}${path}`. */
export function linkIn(message: Pick<DevMailboxRow, 'text'>, path: string): string {
  const links = (message.text ?? '').match(/https?:\/\/\S+/g) ?? [];
  const wanted = [...new Set(links.filter((l) => l.startsWith(`${testBaseUrl}${path}`)))];
  expect(wanted, `links to ${path} in:\n${message.text}`).to.have.length(1);
  return wanted[0];
}

/** The token in the fragment of the message's link to `path`. */
export function tokenFromLink(message: Pick<DevMailboxRow, 'text'>, path: string): string {
  const link = new URL(linkIn(message, path));
  expect(link.pathname).to.equal(path);
  const token = link.hash.slice(1);
  expect(token).to.match(/^[A-Za-z0-9_-]{43}$/);
  return token;
}

export async function messageById(env: MailTestEnv, id: string): Promise<DevMailboxRow | undefined> {
  const [row] = await env.harness.database.db.select().from(devMailbox).where(eq(devMailbox.id, id));
  return row;
}
