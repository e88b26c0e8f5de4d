import { Writable } from 'node:stream';
import { expect } from 'chai';
import { eq } from 'drizzle-orm';
import pino from 'pino';
import supertest from 'supertest';
import { users } from '../../schema/index';
import { hashPassword, verifyPassword } from '../../server/auth/password';
import { ADDRESS_FACTOR } from '../../server/auth/routes';
import { sessionCookieName } from '../../server/app';
import { Client, expectNoSecrets, openTestApp, testPassword, uniqueEmail, type AppUnderTest } from './support';

function sessionCookie(res: { headers: Record<string, unknown> }): string | undefined {
  const cookies = (res.headers['set-cookie'] as string[] | undefined) ?? [];
  return cookies.find((c) => c.startsWith(`${sessionCookieName}=`));
}

describe('auth API', function () {
  this.timeout(30_000);
  let harness: AppUnderTest;
  before(async () => {
    harness = await openTestApp();
  });
  after(() => harness?.close());

  describe('session', () => {
    it('answers signed out with user null and a CSRF token', async () => {
      const client = new Client(harness.app);
      const res = await client.get('/api/auth/session').expect(200);
      expect(res.body.user).to.equal(null);
      expect(res.body.csrfToken).to.be.a('string').with.length.greaterThan(20);
    });

    it('keeps the same token within a session', async () => {
      const client = new Client(harness.app);
      const first = await client.refreshToken();
      expect(await client.refreshToken()).to.equal(first);
    });
  });

  describe('sign-up', () => {
    it('creates the account, signs it in and never returns the hash', async () => {
      const client = new Client(harness.app);
      await client.refreshToken();
      const email = uniqueEmail('newcomer');
      const res = await client.post('/api/auth/signup', { name: '  Ada Newcomer ', email: email.toUpperCase(), password: testPassword }).expect(201);
      expect(res.body.user).to.include({ name: 'Ada Newcomer', email });
      expect(res.body.user.id).to.match(/^[0-9a-f-]{36}$/);
      expect(Object.keys(res.body.user).sort()).to.deep.equal(['email', 'id', 'name']);
      expectNoSecrets(res.body);
      const session = await client.get('/api/auth/session').expect(200);
      expect(session.body.user).to.deep.equal(res.body.user);
      expectNoSecrets(session.body);
    });

    it('stores a salted scrypt hash, not the password', async () => {
      const client = new Client(harness.app);
      const person = await client.signUp();
      const [row] = await harness.database.db.select().from(users).where(eq(users.id, person.id));
      expect(row.passwordHash).to.match(/^scrypt\$\d+\$\d+\$\d+\$[\w-]+\$[\w-]+$/);
      expect(row.passwordHash).not.to.contain(testPassword);
      expect(await verifyPassword(testPassword, row.passwordHash)).to.equal(true);
    });

    const invalid: Array<[string, object, string]> = [
      ['a short password', { name: 'A', email: 'short@example.test', password: 'nine-char' }, 'password'],
      ['a missing name', { email: 'noname@example.test', password: testPassword }, 'name'],
      ['a blank name', { name: '   ', email: 'blank@example.test', password: testPassword }, 'name'],
      ['a malformed e-mail', { name: 'A', email: 'not-an-address', password: testPassword }, 'email'],
      ['a password that is not a string', { name: 'A', email: 'num@example.test', password: 1234567890123 }, 'password'],
    ];
    for (const [label, body, field] of invalid) {
      it(`rejects ${label} with 400 naming "${field}"`, async () => {
        const client = new Client(harness.app);
        await client.refreshToken();
        const res = await client.post('/api/auth/signup', body).expect(400);
        expect(res.body.error.code).to.equal('validation');
        expect(res.body.error.message).to.contain(field);
        expect(res.body.error.details).to.be.an('array');
        expect(res.body.error.details.map((d: { field: string }) => d.field)).to.include(field);
        for (const detail of res.body.error.details) expect(detail.message).to.be.a('string').and.not.equal('');
      });
    }

    it('accepts exactly ten characters', async () => {
      const client = new Client(harness.app);
      await client.signUp({ password: '0123456789' });
    });

    it('refuses a second account for the same e-mail, whatever its case, with 409 on "email"', async () => {
      const email = uniqueEmail('twice');
      await new Client(harness.app).signUp({ email });
      const client = new Client(harness.app);
      await client.refreshToken();
      const res = await client.post('/api/auth/signup', { name: 'B', email: email.toUpperCase(), password: testPassword }).expect(409);
      expect(res.body.error.code).to.equal('email_taken');
      expect(res.body.error.details[0].field).to.equal('email');
    });
  });

  describe('sign-in', () => {
    let person: { email: string; id: string };
    before(async () => {
      person = await new Client(harness.app).signUp();
    });

    it('signs in with the right password, e-mail in any case', async () => {
      const client = new Client(harness.app);
      await client.refreshToken();
      const res = await client.post('/api/auth/signin', { email: person.email.toUpperCase(), password: testPassword }).expect(200);
      expect(res.body.user).to.include({ id: person.id, email: person.email });
      expectNoSecrets(res.body);
      await client.get('/api/teams').expect(200);
    });

    it('gives the same answer for a wrong password and an unknown e-mail', async () => {
      const client = new Client(harness.app);
      await client.refreshToken();
      const wrong = await client.post('/api/auth/signin', { email: person.email, password: 'not the password' });
      const unknown = await client.post('/api/auth/signin', { email: uniqueEmail('nobody'), password: 'not the password' });
      expect(wrong.status).to.equal(401);
      expect(unknown.status).to.equal(401);
      expect(wrong.body).to.deep.equal(unknown.body);
      expect(wrong.body.error.code).to.equal('bad_credentials');
      await client.get('/api/teams').expect(401);
    });

    it('validates the body and names the field', async () => {
      const client = new Client(harness.app);
      await client.refreshToken();
      const res = await client.post('/api/auth/signin', { email: person.email }).expect(400);
      expect(res.body.error.details.map((d: { field: string }) => d.field)).to.deep.equal(['password']);
    });

    it('gives a new session id at sign-in; the old cookie stays signed out', async () => {
      const client = new Client(harness.app);
      const anonymous = await client.agent.get('/api/auth/session').expect(200);
      const before = sessionCookie(anonymous);
      expect(before, 'an anonymous session cookie').to.be.a('string');
      client.token = anonymous.body.csrfToken;
      const signedIn = await client.post('/api/auth/signin', { email: person.email, password: testPassword }).expect(200);
      const after = sessionCookie(signedIn);
      expect(after, 'a new session cookie at sign-in').to.be.a('string');
      expect(after!.split(';')[0]).not.to.equal(before!.split(';')[0]);

      // Replaying the pre-sign-in cookie gets nobody.
      const replay = await supertest(harness.app).get('/api/auth/session').set('Cookie', before!.split(';')[0]);
      expect(replay.body.user).to.equal(null);
      const current = await supertest(harness.app).get('/api/auth/session').set('Cookie', after!.split(';')[0]);
      expect(current.body.user).to.include({ id: person.id });
    });

    it('sets the session cookie httpOnly and SameSite=Lax (not Secure outside production)', async () => {
      const client = new Client(harness.app);
      const res = await client.agent.get('/api/auth/session').expect(200);
      const cookie = sessionCookie(res)!;
      expect(cookie).to.match(/; HttpOnly/i);
      expect(cookie).to.match(/; SameSite=Lax/i);
      expect(cookie).not.to.match(/; Secure/i);
    });
  });

  describe('sign-out', () => {
    it('ends the session and changes the CSRF token', async () => {
      const client = new Client(harness.app);
      await client.signUp();
      const tokenBefore = client.token;
      await client.post('/api/auth/signout').expect(204);
      const session = await client.get('/api/auth/session').expect(200);
      expect(session.body.user).to.equal(null);
      expect(session.body.csrfToken).not.to.equal(tokenBefore);
      await client.get('/api/teams').expect(401);
    });
  });

  describe('CSRF', () => {
    it('rejects a state-changing request without the header with 403 csrf', async () => {
      const client = new Client(harness.app);
      await client.refreshToken();
      const res = await client.agent.post('/api/auth/signup').send({ name: 'A', email: uniqueEmail(), password: testPassword }).expect(403);
      expect(res.body.error.code).to.equal('csrf');
    });

    it('rejects a wrong token, and a token from another session', async () => {
      const client = new Client(harness.app);
      await client.signUp();
      const other = new Client(harness.app);
      const otherToken = await other.refreshToken();
      for (const token of ['x'.repeat(43), otherToken, '']) {
        const res = await client.agent.post('/api/teams').set('X-CSRF-Token', token).send({ name: 'T' }).expect(403);
        expect(res.body.error.code).to.equal('csrf');
      }
      await client.post('/api/teams', { name: 'T' }).expect(201);
    });

    it('rejects the pre-sign-in token after sign-in', async () => {
      const person = await new Client(harness.app).signUp();
      const client = new Client(harness.app);
      const old = await client.refreshToken();
      await client.post('/api/auth/signin', { email: person.email, password: testPassword }).expect(200);
      const res = await client.agent.post('/api/teams').set('X-CSRF-Token', old).send({ name: 'T' }).expect(403);
      expect(res.body.error.code).to.equal('csrf');
    });

    it('rejects PATCH and DELETE without a token too', async () => {
      const client = new Client(harness.app);
      await client.signUp();
      const id = '00000000-0000-4000-8000-000000000000';
      expect((await client.agent.patch(`/api/teams/${id}/members/${id}`).send({ role: 'viewer' })).body.error.code).to.equal('csrf');
      expect((await client.agent.delete(`/api/teams/${id}/members/${id}`)).body.error.code).to.equal('csrf');
    });
  });

  describe('rate limit', () => {
    let limited: AppUnderTest;
    before(async () => {
      limited = await openTestApp({ authRateLimit: { windowMs: 60_000, limit: 3 } });
    });
    after(() => limited?.close());

    it('answers 429 rate_limited after too many failed sign-ins', async () => {
      const person = await new Client(limited.app).signUp();
      const client = new Client(limited.app);
      await client.refreshToken();
      for (let i = 0; i < 3; i++) {
        await client.post('/api/auth/signin', { email: person.email, password: 'wrong password' }).expect(401);
      }
      const res = await client.post('/api/auth/signin', { email: person.email, password: testPassword }).expect(429);
      expect(res.body.error.code).to.equal('rate_limited');
      expect(res.body.error.message).to.match(/try again/i);
    });

    it('limits failed sign-ins per account at one address, so colleagues there can still sign in, and per address across accounts', async () => {
      // Throttling per account and per source: OWASP Authentication Cheat Sheet, "Account lockout".
      const fresh = await openTestApp({ authRateLimit: { windowMs: 60_000, limit: 3 } });
      try {
        const typist = await new Client(fresh.app).signUp();
        const colleague = await new Client(fresh.app).signUp();
        const client = new Client(fresh.app);
        await client.refreshToken();
        for (let i = 0; i < 3; i++) await client.post('/api/auth/signin', { email: typist.email, password: 'wrong password' }).expect(401);
        await client.post('/api/auth/signin', { email: typist.email.toUpperCase(), password: testPassword }).expect(429);
        await new Client(fresh.app).signIn(colleague.email, testPassword);
        // Many accounts tried from one address: refused after ADDRESS_FACTOR × 3 failures in all.
        const statuses: number[] = [];
        for (let i = 0; i < 3 * ADDRESS_FACTOR; i++) {
          statuses.push((await client.post('/api/auth/signin', { email: `nobody-${i}@harrowvale.test`, password: 'guess' })).status);
        }
        // The typist's refused attempt above counted for the address too (any answer ≥ 400 does).
        expect(statuses.filter((st) => st === 401).length).to.equal(3 * ADDRESS_FACTOR - 4);
        expect(statuses.slice(-3)).to.deep.equal([429, 429, 429]);
      } finally {
        await fresh.close();
      }
    });

    it('answers 429 after too many sign-ups', async () => {
      const fresh = await openTestApp({ authRateLimit: { windowMs: 60_000, limit: 3 } });
      try {
        for (let i = 0; i < 3; i++) await new Client(fresh.app).signUp();
        const client = new Client(fresh.app);
        await client.refreshToken();
        const res = await client.post('/api/auth/signup', { name: 'A', email: uniqueEmail(), password: testPassword }).expect(429);
        expect(res.body.error.code).to.equal('rate_limited');
      } finally {
        await fresh.close();
      }
    });
  });

  describe('production cookies', () => {
    it('marks the session cookie Secure behind a TLS proxy on loopback', async () => {
      const secure = await openTestApp({ production: true });
      try {
        const res = await new Client(secure.app).agent.get('/api/auth/session').set('X-Forwarded-Proto', 'https').expect(200);
        expect(sessionCookie(res)).to.match(/; Secure/i);
        expect(res.headers['strict-transport-security']).to.be.a('string');
      } finally {
        await secure.close();
      }
    });
  });

  describe('logging', () => {
    it('never writes passwords, hashes, cookies or CSRF tokens to the log', async () => {
      let logged = '';
      const sink = new Writable({
        write(chunk, _encoding, done) {
          logged += chunk.toString();
          done();
        },
      });
      const logging = await openTestApp({ logger: pino({ level: 'trace' }, sink) });
      try {
        const client = new Client(logging.app);
        const password = 'a very particular password 8472';
        const person = await client.signUp({ password });
        await client.post('/api/auth/signout').expect(204);
        await client.refreshToken();
        const res = await client.post('/api/auth/signin', { email: person.email, password }).expect(200);
        const cookie = sessionCookie(res)!.split(';')[0].split('=')[1];
        await client.refreshToken();
        const [row] = await logging.database.db.select().from(users).where(eq(users.id, person.id));

        expect(logged).to.contain('/api/auth/signin');
        expect(logged).not.to.contain(password);
        expect(logged).not.to.contain(row.passwordHash.split('$')[5]);
        expect(logged).not.to.contain(decodeURIComponent(cookie));
        expect(logged).not.to.contain(client.token);
      } finally {
        await logging.close();
      }
    });
  });
});

describe('password hashing', () => {
  it('salts: the same password hashes differently each time, and both verify', async () => {
    const a = await hashPassword('same password here');
    const b = await hashPassword('same password here');
    expect(a).not.to.equal(b);
    expect(await verifyPassword('same password here', a)).to.equal(true);
    expect(await verifyPassword('same password here', b)).to.equal(true);
  });

  it('rejects a wrong password and a malformed hash', async () => {
    const hash = await hashPassword('right password');
    expect(await verifyPassword('wrong password', hash)).to.equal(false);
    expect(await verifyPassword('right password', 'plain')).to.equal(false);
    expect(await verifyPassword('right password', hash.replace(/\$[^$]+$/, '$AAAA'))).to.equal(false);
  });
});
