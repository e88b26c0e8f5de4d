/**
 * The mail machinery: message templates, the local mail server (real SMTP in, parsed rows out), the
 * outbox sender (delivery, retries with growing delays, giving up, no double delivery with two
 * senders), requests that never wait for mail, and the development mailbox API.
 */
import net from 'node:net';
import { Writable } from 'node:stream';
import { expect } from 'chai';
import { eq, inArray, sql } from 'drizzle-orm';
import nodemailer, { type SendMailOptions, type Transporter } from 'nodemailer';
import pino from 'pino';
import { devMailbox, mailOutbox } from '../../schema/index';
import { openDatabase, type DatabaseHandle } from '../../server/db/client';
import { createLogger } from '../../server/log';
import { mailSettingsFromEnv, parseAddressList } from '../../server/mail/config';
import { sanitizeMailHtml, startFakeSmtp, type FakeSmtp } from '../../server/mail/fake-smtp';
import { defaultRetryDelayMs, enqueueMail, OutboxSender } from '../../server/mail/outbox';
import {
  escapeHtml,
  formatUtc,
  invitationAcceptedMail,
  invitationMail,
  passwordResetMail,
  reviewRequestedMail,
  reviewVerdictMail,
  type MailContent,
} from '../../server/mail/templates';
import { createTestDatabase, suiteDatabaseUrl } from '../support/db';
import { fakeTransport, openMailTestApp, type MailTestEnv } from './mail-support';
import { Client, uniqueEmail } from './support';

const base = 'https://spreadproof.example.test';

function everyTemplate(): Array<[string, MailContent, string]> {
  const expiresAt = new Date(Date.UTC(2031, 2, 4, 9, 12));
  return [
    ['invitation', invitationMail({ baseUrl: base, link: `${base}/invitation#tok`, teamName: 'Metrology <Lab>', role: 'reviewer', invitedByName: 'Ines "I" Okafor', expiresAt, accountExists: false }), `${base}/invitation#tok`],
    ['password reset', passwordResetMail({ baseUrl: base, link: `${base}/account/new-password#tok`, email: 'a@b.test', expiresAt }), `${base}/account/new-password#tok`],
    ['review requested', reviewRequestedMail({ baseUrl: base, link: `${base}/revisions/r1`, settingsUrl: `${base}/account/notifications`, requestedByName: 'Tomas <b>L</b>', worksheetTitle: 'Bore & gauge', revisionNumber: 3, teamName: 'Metrology Lab', message: 'Check <script>alert(1)</script>\nsecond line' }), `${base}/revisions/r1`],
    ['review verdict', reviewVerdictMail({ baseUrl: base, link: `${base}/revisions/r1`, settingsUrl: `${base}/account/notifications`, reviewerName: 'Priya', verdict: 'approved', comment: '', worksheetTitle: 'Bore gauge', revisionNumber: 3, contentHash: 'ab'.repeat(32) }), `${base}/revisions/r1`],
    ['invitation accepted', invitationAcceptedMail({ baseUrl: base, link: `${base}/teams/t1`, settingsUrl: `${base}/account/notifications`, memberName: 'Nadia', memberEmail: 'n@b.test', teamName: 'Metrology Lab', role: 'viewer' }), `${base}/teams/t1`],
  ];
}

describe('mail templates', () => {
  for (const [name, content, link] of everyTemplate()) {
    describe(name, () => {
      it('names the product and links to the page concerned, in both parts', () => {
        expect(content.text).to.contain('Spreadproof');
        expect(content.html).to.contain('SPREADPROOF');
        expect(content.text).to.contain(link);
        expect(content.html).to.contain(`href="${escapeHtml(link)}"`);
        expect(content.subject).to.be.a('string').with.length.greaterThan(10);
      });

      it('has no images, no tracking and no outside resources', () => {
        expect(content.html).not.to.match(/<img|<script|<link|<iframe|url\(|@import|src=/i);
        const urls = [...content.html.matchAll(/https?:\/\/[^\s"'<>)]+/g)].map((m) => m[0]);
        expect(urls.length).to.be.greaterThan(0);
        for (const url of urls) expect(url.startsWith(base), url).to.equal(true);
        const textUrls = content.text.match(/https?:\/\/\S+/g) ?? [];
        for (const url of textUrls) expect(url.startsWith(base), url).to.equal(true);
      });

      it('escapes every value put into the HTML', () => {
        expect(content.html).not.to.match(/<b>L<\/b>|<script>|<Lab>|"I"/);
      });
    });
  }

  it('quotes a request message with its line breaks, escaped', () => {
    const [, content] = everyTemplate()[2];
    expect(content.html).to.contain('Check &lt;script&gt;alert(1)&lt;/script&gt;\nsecond line');
    expect(content.text).to.contain('    Check <script>alert(1)</script>\n    second line');
  });

  it('offers the notification settings in notifications only', () => {
    const [invitation, reset, requested, verdict, accepted] = everyTemplate().map(([, c]) => c);
    for (const c of [requested, verdict, accepted]) expect(c.text).to.contain(`${base}/account/notifications`);
    for (const c of [invitation, reset]) expect(c.text).not.to.contain('/account/notifications');
  });

  it('states expiry times in UTC, unambiguously', () => {
    expect(formatUtc(new Date(Date.UTC(2031, 2, 4, 9, 5)))).to.equal('4 March 2031, 09:05 UTC');
    const [, invitation] = everyTemplate()[0];
    expect(invitation.text).to.contain('until 4 March 2031, 09:12 UTC');
  });
});

describe('mail settings', () => {
  it('reads SMTP_URL, MAIL_FROM, APP_BASE_URL and SITE_ADMINS; the demo owner is a site admin in development only', () => {
    const dev = mailSettingsFromEnv({ SMTP_URL: ' smtp://mail.example.test:587 ', MAIL_FROM: 'Lab <lab@example.test>', APP_BASE_URL: 'https://app.example.test/', SITE_ADMINS: 'A@x.test, b@x.test;c@x.test' });
    expect(dev).to.deep.include({ smtpUrl: 'smtp://mail.example.test:587', from: 'Lab <lab@example.test>', baseUrl: 'https://app.example.test', production: false });
    expect(dev.siteAdmins).to.deep.equal(['a@x.test', 'b@x.test', 'c@x.test', 'ines.okafor@harrowvale.test']);
    const prod = mailSettingsFromEnv({ NODE_ENV: 'production', SITE_ADMINS: 'a@x.test' });
    expect(prod.siteAdmins).to.deep.equal(['a@x.test']);
    expect(prod.smtpUrl).to.equal(null);
    expect(() => mailSettingsFromEnv({ APP_BASE_URL: 'ftp://x' })).to.throw(/APP_BASE_URL/);
    expect(parseAddressList(' , nobody ,x@y.test')).to.deep.equal(['x@y.test']);
  });

  it('retries after 30 s, 2 min, 8 min … and never waits more than 6 h', () => {
    expect([1, 2, 3, 4].map(defaultRetryDelayMs)).to.deep.equal([30_000, 120_000, 480_000, 1_920_000]);
    expect(defaultRetryDelayMs(20)).to.equal(6 * 60 * 60 * 1000);
  });
});

describe('local mail server and outbox sender', function () {
  this.timeout(30_000);
  let database: DatabaseHandle;
  let own: Awaited<ReturnType<typeof createTestDatabase>>;
  let fake: FakeSmtp;
  const logger = createLogger('silent');

  // A database of its own: background senders of other suites' apps share the run's database and
  // would deliver these queued messages before the sender under test gets to them.
  before(async () => {
    own = await createTestDatabase();
    database = openDatabase(own.url, { max: 4 });
    fake = await startFakeSmtp({ db: database.db, logger });
  });
  after(async () => {
    await fake?.close();
    await database?.close();
    await own?.drop();
  });

  const stored = (to: string) =>
    database.db.select().from(devMailbox).where(sql`${to} = any(${devMailbox.envelopeTo})`);

  it('receives a message over SMTP and keeps its parsed parts, non-ASCII text included', async () => {
    const to = uniqueEmail('parse');
    const transport = fakeTransport(fake);
    await transport.sendMail({
      from: 'Spreadproof <no-reply@spreadproof.invalid>',
      to,
      subject: 'σ upper bound 0.52 µm — Ø 12 mm bores',
      text: 'Résultat: σ ≤ 0.52 µm at 95 %.\n'.repeat(40),
      html: '<p>Résultat: <strong>σ ≤ 0.52 µm</strong></p>',
    });
    transport.close();
    const [row] = await stored(to);
    expect(row.subject).to.equal('σ upper bound 0.52 µm — Ø 12 mm bores');
    expect(row.text).to.contain('Résultat: σ ≤ 0.52 µm at 95 %.');
    expect(row.html).to.contain('<strong>σ ≤ 0.52 µm</strong>');
    expect(row.fromHeader).to.equal('"Spreadproof" <no-reply@spreadproof.invalid>');
    expect(row.envelopeTo).to.deep.equal([to]);
    // The raw source is the encoded message, not the decoded text.
    expect(row.raw).to.match(/^Subject: =\?UTF-8\?/m);
  });

  it('refuses to listen anywhere but loopback', () => {
    expect(fake.host).to.equal('127.0.0.1');
    expect(fake.url).to.equal(`smtp://127.0.0.1:${fake.port}`);
  });

  async function queue(count: number, label: string): Promise<{ ids: string[]; to: string }> {
    const to = uniqueEmail(label);
    const ids: string[] = [];
    for (let i = 0; i < count; i += 1) {
      const id = await enqueueMail(database.db, { kind: 'review_requested', to, subject: `${label} ${i}`, text: `body ${i}`, html: `<p>body ${i}</p>` });
      ids.push(id!);
    }
    return { ids, to };
  }

  /** Fails the first `failures` sends, then passes them to the local mail server. */
  function flakyTransport(failures: number): Transporter & { calls: number } {
    const real = fakeTransport(fake);
    const flaky = {
      calls: 0,
      sendMail(message: SendMailOptions) {
        flaky.calls += 1;
        if (flaky.calls <= failures) return Promise.reject(new Error(`connect ECONNREFUSED (simulated failure ${flaky.calls})`));
        return real.sendMail(message);
      },
      close: () => real.close(),
    };
    return flaky as unknown as Transporter & { calls: number };
  }

  function capturingLogger() {
    const lines: Array<{ level: number; msg: string; mailId?: string; retryInMs?: number }> = [];
    const stream = new Writable({
      write(chunk, _encoding, done) {
        for (const line of String(chunk).split('\n').filter(Boolean)) lines.push(JSON.parse(line));
        done();
      },
    });
    return { logger: pino({ level: 'info' }, stream), lines };
  }

  it('retries a failed delivery with the configured delay, logs each failure, and delivers once it works', async () => {
    const { ids, to } = await queue(1, 'retry');
    const { logger: log, lines } = capturingLogger();
    const delays: number[] = [];
    const transport = flakyTransport(2);
    const sender = new OutboxSender({
      db: database.db,
      logger: log,
      transport,
      from: 'x@spreadproof.invalid',
      retryDelayMs: (n) => {
        delays.push(n);
        return 0;
      },
    });
    await sender.drain();
    const [row] = await database.db.select().from(mailOutbox).where(eq(mailOutbox.id, ids[0]));
    expect(row).to.include({ status: 'sent', attempts: 3, textBody: null, htmlBody: null, lastError: null });
    expect(delays).to.include.members([1, 2]);
    expect((await stored(to)).map((m) => m.subject)).to.deep.equal(['retry 0']);
    const mine = lines.filter((l) => l.mailId === ids[0]);
    expect(mine.map((l) => [l.level, l.msg])).to.deep.equal([
      [40, 'mail delivery failed; will retry'],
      [40, 'mail delivery failed; will retry'],
      [30, 'mail sent'],
    ]);
    transport.close();
  });

  it('waits out the retry delay before trying again', async () => {
    const { ids } = await queue(1, 'later');
    const transport = flakyTransport(1);
    const sender = new OutboxSender({ db: database.db, logger, transport, from: 'x@spreadproof.invalid', retryDelayMs: () => 3_600_000 });
    await sender.drain();
    const [row] = await database.db.select().from(mailOutbox).where(eq(mailOutbox.id, ids[0]));
    expect(row).to.include({ status: 'pending', attempts: 1 });
    expect(row.lastError).to.contain('ECONNREFUSED');
    const waitMs = row.nextAttemptAt.getTime() - Date.now();
    expect(waitMs).to.be.greaterThan(3_500_000).and.lessThan(3_700_000);
    expect(row.textBody).to.equal('body 0');
    transport.close();
  });

  it('gives a message up after the last attempt, erases its bodies and logs an error', async () => {
    const { ids, to } = await queue(1, 'doomed');
    const { logger: log, lines } = capturingLogger();
    const transport = flakyTransport(1000);
    const sender = new OutboxSender({ db: database.db, logger: log, transport, from: 'x@spreadproof.invalid', maxAttempts: 3, retryDelayMs: () => 0 });
    await sender.drain();
    const [row] = await database.db.select().from(mailOutbox).where(eq(mailOutbox.id, ids[0]));
    expect(row).to.include({ status: 'failed', attempts: 3, textBody: null, htmlBody: null });
    expect(row.lastError).to.contain('simulated failure');
    expect(await stored(to)).to.deep.equal([]);
    const mine = lines.filter((l) => l.mailId === ids[0]);
    expect(mine.at(-1)).to.include({ level: 50, msg: 'mail given up after repeated failures' });
    transport.close();
  });

  it('delivers each message once when two senders drain the outbox at the same time', async () => {
    const { ids, to } = await queue(12, 'pair');
    const senders = [0, 1].map(
      () => new OutboxSender({ db: database.db, logger, transport: fakeTransport(fake), from: 'x@spreadproof.invalid', batchSize: 3 }),
    );
    await Promise.all(senders.map((s) => s.drain()));
    const rows = await database.db.select().from(mailOutbox).where(inArray(mailOutbox.id, ids));
    expect(rows.map((r) => [r.status, r.attempts])).to.deep.equal(ids.map(() => ['sent', 1]));
    const subjects = (await stored(to)).map((m) => m.subject).sort();
    expect(subjects).to.deep.equal(ids.map((_, i) => `pair ${i}`).sort());
  });

  it('keeps messages queued when there is no transport', async () => {
    const { ids } = await queue(1, 'queued');
    const sender = new OutboxSender({ db: database.db, logger, transport: null, from: 'x@spreadproof.invalid' });
    expect(await sender.drain()).to.equal(0);
    const [row] = await database.db.select().from(mailOutbox).where(eq(mailOutbox.id, ids[0]));
    expect(row).to.include({ status: 'pending', attempts: 0 });
    // Leave no pending row behind for other suites' senders.
    await database.db.delete(mailOutbox).where(eq(mailOutbox.id, ids[0]));
  });

  it('keeps only sanitized HTML for display: no scripts, no outside images, no event handlers', () => {
    const clean = sanitizeMailHtml(
      '<p style="color:red" onclick="x()">Hi <script>alert(1)</script><img src="https://tracker.example/p.gif"><img src="data:image/png;base64,AAAA" alt="inline"><a href="javascript:alert(1)">x</a><a href="https://spreadproof.example.test/r">ok</a><iframe src="https://x"></iframe></p>',
    );
    expect(clean).to.contain('style="color:red"');
    expect(clean).not.to.match(/onclick|<script|tracker\.example|javascript:|<iframe/);
    expect(clean).to.contain('src="data:image/png;base64,AAAA"');
    expect(clean).to.contain('href="https://spreadproof.example.test/r"');
    expect(clean).to.contain('rel="noopener noreferrer"');
    const page = sanitizeMailHtml(
      '<!doctype html><html><head><title>Subject line</title></head><body style="color:#123"><p style="background:url(https://x.example/p.gif)">text</p></body></html>',
    );
    expect(page).to.equal('<div style="color:#123"><p>text</p></div>');
  });
});

describe('requests never wait for mail', function () {
  this.timeout(30_000);
  let env: MailTestEnv;
  let silent: net.Server;
  const sockets = new Set<net.Socket>();

  before(async () => {
    // Deliver whatever other suites left due, so the hanging server below only meets this suite's mail.
    const cleanup = openDatabase(await suiteDatabaseUrl(), { max: 2 });
    const fake = await startFakeSmtp({ db: cleanup.db, logger: createLogger('silent') });
    await new OutboxSender({ db: cleanup.db, logger: createLogger('silent'), transport: fakeTransport(fake), from: 'x@spreadproof.invalid' }).drain();
    await fake.close();
    await cleanup.close();
    // An SMTP server that accepts connections and never says a word.
    silent = net.createServer((socket) => {
      sockets.add(socket);
      socket.on('close', () => sockets.delete(socket));
    });
    await new Promise<void>((resolve) => silent.listen(0, '127.0.0.1', resolve));
    const { port } = silent.address() as net.AddressInfo;
    const transport = nodemailer.createTransport({ host: '127.0.0.1', port, secure: false, ignoreTLS: true, greetingTimeout: 1500, connectionTimeout: 1500 });
    env = await openMailTestApp({ transport });
  });
  after(async () => {
    await env?.close();
    for (const socket of sockets) socket.destroy();
    await new Promise<void>((resolve) => silent.close(() => resolve()));
  });

  it('answers an invitation and a reset request while the mail server hangs, and keeps the messages for a retry', async () => {
    const owner = new Client(env.harness.app);
    const ownerUser = await owner.signUp();
    const teamId = (await owner.post('/api/teams', { name: 'Hanging mail' }).expect(201)).body.team.id;
    const email = uniqueEmail('patient');
    await owner.post(`/api/teams/${teamId}/invitations`, { email, role: 'viewer' }).expect(201);
    const visitor = new Client(env.harness.app);
    await visitor.refreshToken();
    await visitor.post('/api/password-reset/request', { email: ownerUser.email }).expect(202);

    // Let the sender reach the silent server (it is stuck there) and the reset task write its row.
    await new Promise((resolve) => setTimeout(resolve, 300));
    expect(sockets.size).to.be.greaterThan(0);
    await env.mail.flush();
    const rows = await env.harness.database.db
      .select()
      .from(mailOutbox)
      .where(inArray(mailOutbox.recipient, [email, ownerUser.email]));
    expect(rows.map((r) => r.kind).sort()).to.deep.equal(['invitation', 'password_reset']);
    for (const row of rows) {
      expect(row.status).to.equal('pending');
      expect(row.attempts).to.equal(1);
      expect(row.lastError).to.match(/Greeting never received|timeout/i);
      expect(row.textBody).to.be.a('string');
    }
    // Leave no pending rows behind for other suites' senders.
    await env.harness.database.db.delete(mailOutbox).where(inArray(mailOutbox.id, rows.map((r) => r.id)));
  });
});

describe('development mailbox API', function () {
  this.timeout(30_000);
  let env: MailTestEnv;
  const adminEmail = uniqueEmail('site-admin');

  before(async () => {
    env = await openMailTestApp({ siteAdmins: [adminEmail] });
  });
  after(() => env?.close());

  it('lists and shows received messages to site admins only', async () => {
    const admin = new Client(env.harness.app);
    await admin.signUp({ email: adminEmail });
    const someone = new Client(env.harness.app);
    await someone.signUp();
    const to = uniqueEmail('listed');
    await env.mail.enqueue({ kind: 'password_reset', to, subject: 'Mailbox check', text: 'plain words', html: '<p>rich <script>x()</script>words</p>' });
    await env.mail.flush();

    expect((await admin.get('/api/account').expect(200)).body.mailbox).to.equal(true);
    expect((await someone.get('/api/account').expect(200)).body.mailbox).to.equal(false);

    const list = await admin.get(`/api/dev/mailbox?to=${encodeURIComponent(to)}`).expect(200);
    expect(list.body.total).to.equal(1);
    expect(list.body.items[0]).to.include({ subject: 'Mailbox check', from: '"Spreadproof test" <no-reply@spreadproof.invalid>' });
    expect(list.body.items[0].to).to.deep.equal([to]);
    const detail = await admin.get(`/api/dev/mailbox/${list.body.items[0].id}`).expect(200);
    expect(detail.body.message.text.trim()).to.equal('plain words');
    expect(detail.body.message.html).to.contain('rich');
    expect(detail.body.message.html).not.to.contain('<script');
    expect(detail.body.message.raw).to.contain('Subject: Mailbox check');

    const refused = await someone.get('/api/dev/mailbox').expect(403);
    expect(refused.body.error.code).to.equal('forbidden');
    await someone.get(`/api/dev/mailbox/${list.body.items[0].id}`).expect(403);
    const signedOut = new Client(env.harness.app);
    await signedOut.get('/api/dev/mailbox').expect(401);
    await admin.get('/api/dev/mailbox/00000000-0000-4000-8000-000000000000').expect(404);
  });

  it('does not exist when the local mail server is not in use', async () => {
    const other = await openMailTestApp({ siteAdmins: [adminEmail], mailboxEnabled: false });
    try {
      const admin = new Client(other.harness.app);
      await admin.signIn(adminEmail);
      expect((await admin.get('/api/account').expect(200)).body.mailbox).to.equal(false);
      await admin.get('/api/dev/mailbox').expect(404);
    } finally {
      await other.close();
    }
  });

  it('lets a site admin empty the mailbox', async () => {
    const admin = new Client(env.harness.app);
    await admin.signIn(adminEmail);
    await admin.delete('/api/dev/mailbox').expect(204);
    const list = await admin.get('/api/dev/mailbox').expect(200);
    expect(list.body).to.include({ total: 0 });
  });
});
