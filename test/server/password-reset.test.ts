/**
 * Password reset end to end through the local mail server: the same answer for known and unknown
 * addresses, the link in the real message, single use, expiry, and the end of every other session.
 */
import { createHash } from 'node:crypto';
import { expect } from 'chai';
import { eq, sql } from 'drizzle-orm';
import { mailOutbox, passwordResets, sessions } from '../../schema/index';
import { openMailTestApp, tokenFromLink, type MailTestEnv } from './mail-support';
import { Client, testPassword, uniqueEmail } from './support';

const newPassword = 'a brand new passphrase';

describe('password reset by e-mail', function () {
  this.timeout(60_000);
  let env: MailTestEnv;
  before(async () => {
    env = await openMailTestApp();
  });
  after(() => env?.close());

  async function requestReset(email: string) {
    const client = new Client(env.harness.app);
    await client.refreshToken();
    return client.post('/api/password-reset/request', { email }).expect(202);
  }

  it('answers a known and an unknown address identically, and mails only the account', async () => {
    const person = await new Client(env.harness.app).signUp();
    const unknown = uniqueEmail('nobody');
    const known = await requestReset(person.email.toUpperCase());
    const missing = await requestReset(unknown);
    expect(known.body).to.deep.equal(missing.body);
    expect(Object.keys(known.body)).to.deep.equal(['message']);
    expect(known.headers['content-length']).to.equal(missing.headers['content-length']);

    expect(await env.inbox(unknown)).to.deep.equal([]);
    const outboxForUnknown = await env.harness.database.db.select().from(mailOutbox).where(eq(mailOutbox.recipient, unknown));
    expect(outboxForUnknown).to.deep.equal([]);
    const messages = await env.inbox(person.email);
    expect(messages).to.have.length(1);
    expect(messages[0].subject).to.equal('Choose a new Spreadproof password');
    expect(messages[0].text).to.contain(person.email);
    expect(messages[0].text).to.contain('signs the account out on every other device');
  });

  it('sets the new password from the link, signs in there, and ends every other session', async () => {
    const laptop = new Client(env.harness.app);
    const person = await laptop.signUp();
    const phone = new Client(env.harness.app);
    await phone.signIn(person.email);
    expect((await laptop.get('/api/auth/session').expect(200)).body.user.id).to.equal(person.id);
    expect((await phone.get('/api/auth/session').expect(200)).body.user.id).to.equal(person.id);
    const { db } = env.harness.database;
    const sessionsOf = async () =>
      (await db.select({ sid: sessions.sid }).from(sessions).where(sql`${sessions.sess}->'passport'->>'user' = ${person.id}`)).length;
    expect(await sessionsOf()).to.equal(2);

    await requestReset(person.email);
    const [message] = await env.inbox(person.email);
    const token = tokenFromLink(message, '/account/new-password');
    const [stored] = await db.select().from(passwordResets).where(eq(passwordResets.userId, person.id));
    expect(stored.tokenHash).to.equal(createHash('sha256').update(token).digest('hex'));

    const browser = new Client(env.harness.app);
    await browser.refreshToken();
    const checked = await browser.post('/api/password-reset/check', { token }).expect(200);
    expect(checked.body.email).to.equal(person.email);
    const done = await browser.post('/api/password-reset/complete', { token, password: newPassword }).expect(200);
    expect(done.body.user).to.deep.equal({ id: person.id, name: person.name, email: person.email });

    // Signed in where the password was set; signed out everywhere else.
    expect((await browser.get('/api/auth/session').expect(200)).body.user.id).to.equal(person.id);
    expect((await laptop.get('/api/auth/session').expect(200)).body.user).to.equal(null);
    expect((await phone.get('/api/auth/session').expect(200)).body.user).to.equal(null);
    expect(await sessionsOf()).to.equal(1);

    // Old password no longer works; the new one does.
    const other = new Client(env.harness.app);
    await other.refreshToken();
    await other.post('/api/auth/signin', { email: person.email, password: testPassword }).expect(401);
    await other.signIn(person.email, newPassword);

    // The link worked once.
    const again = new Client(env.harness.app);
    await again.refreshToken();
    expect((await again.post('/api/password-reset/complete', { token, password: 'yet another passphrase' }).expect(410)).body.error.code).to.equal(
      'reset_link_invalid',
    );
    expect((await again.post('/api/password-reset/check', { token }).expect(410)).body.error.code).to.equal('reset_link_invalid');
  });

  it('voids an earlier link when a newer one is sent, and refuses an expired one', async () => {
    const person = await new Client(env.harness.app).signUp();
    await requestReset(person.email);
    await requestReset(person.email);
    const messages = await env.inbox(person.email);
    expect(messages).to.have.length(2);
    const [older, newer] = messages.map((m) => tokenFromLink(m, '/account/new-password'));
    const client = new Client(env.harness.app);
    await client.refreshToken();
    await client.post('/api/password-reset/check', { token: older }).expect(410);
    await client.post('/api/password-reset/check', { token: newer }).expect(200);

    await env.harness.database.db
      .update(passwordResets)
      .set({ expiresAt: sql`now() - interval '1 second'` })
      .where(eq(passwordResets.userId, person.id));
    await client.post('/api/password-reset/check', { token: newer }).expect(410);
    await client.post('/api/password-reset/complete', { token: newer, password: newPassword }).expect(410);
    // The password is unchanged.
    await new Client(env.harness.app).signIn(person.email, testPassword);
  });

  it('validates the new password and the token', async () => {
    const client = new Client(env.harness.app);
    await client.refreshToken();
    const short = await client.post('/api/password-reset/complete', { token: 'A'.repeat(43), password: 'short' }).expect(400);
    expect(short.body.error.details.map((d: { field: string }) => d.field)).to.deep.equal(['password']);
    await client.post('/api/password-reset/complete', { token: 'A'.repeat(43), password: newPassword }).expect(410);
    const bad = await client.post('/api/password-reset/request', { email: 'not an address' }).expect(400);
    expect(bad.body.error.code).to.equal('validation');
  });
});

describe('password reset rate limits', function () {
  this.timeout(30_000);
  let env: MailTestEnv;
  before(async () => {
    env = await openMailTestApp({
      limits: { resetPerEmail: { windowMs: 60_000, limit: 2 }, resetPerAddress: { windowMs: 60_000, limit: 4 } },
    });
  });
  after(() => env?.close());

  it('limits requests per asked address and per client, whether or not the address exists', async () => {
    const client = new Client(env.harness.app);
    await client.refreshToken();
    const target = uniqueEmail('flooded');
    await client.post('/api/password-reset/request', { email: target }).expect(202);
    await client.post('/api/password-reset/request', { email: target.toUpperCase() }).expect(202);
    const limited = await client.post('/api/password-reset/request', { email: target }).expect(429);
    expect(limited.body.error.code).to.equal('rate_limited');
    await client.post('/api/password-reset/request', { email: uniqueEmail() }).expect(202);
    // Fifth request from the same client address: over the per-address limit of 4.
    await client.post('/api/password-reset/request', { email: uniqueEmail() }).expect(429);
  });
});
