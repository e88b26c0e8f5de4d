/**
 * Rate-limit counters live in PostgreSQL (server/http/rate-limit-store.ts), so that two server
 * processes of one deployment count failed sign-ins and guessed tokens together. Here: two apps on
 * one database with the same session secret share the counts, an app with another secret does
 * not, successful sign-ins do not count, and a window that has ended starts again.
 * (The same with two real processes: scale-out.test.ts.)
 */
import { randomBytes } from 'node:crypto';
import { expect } from 'chai';
import { suiteDatabaseUrl } from '../support/db';
import { Client, testPassword } from '../server/support';
import { createBoreWorksheet, openServiceApp, teamOfRoles } from '../server/worksheets-support';
import { openAppOn, sleep, withClient, type AppOn } from './support';

describe('reliability: rate-limit counters shared through PostgreSQL', function () {
  this.timeout(60_000);
  const secret = randomBytes(24).toString('base64url');
  const limit = { windowMs: 60_000, limit: 3 };
  let first: AppOn;
  let second: AppOn;
  let stranger: AppOn;
  let email: string;

  before(async () => {
    const url = await suiteDatabaseUrl();
    first = openAppOn(url, { sessionSecret: secret, authRateLimit: limit });
    second = openAppOn(url, { sessionSecret: secret, authRateLimit: limit });
    stranger = openAppOn(url, { sessionSecret: randomBytes(24).toString('base64url'), authRateLimit: limit });
    const person = await new Client(first.app).signUp({ name: 'Counted Person' });
    email = person.email;
  });
  after(async () => {
    await first?.close();
    await second?.close();
    await stranger?.close();
  });

  async function attempt(app: AppOn, password: string): Promise<number> {
    const client = new Client(app.app);
    await client.refreshToken();
    const res = await client.post('/api/auth/signin', { email, password });
    return res.status;
  }

  it('counts failed sign-ins on two apps of one deployment together, and apart from another deployment', async () => {
    expect(await attempt(first, 'wrong one')).to.equal(401);
    expect(await attempt(second, 'wrong two')).to.equal(401);
    // A successful sign-in in between does not count against the limit.
    expect(await attempt(second, testPassword)).to.equal(200);
    expect(await attempt(first, 'wrong three')).to.equal(401);
    // The fourth failure, on either app, is over the limit of three. (Counted per process, each
    // app would have seen at most two failures here and answered 401.)
    expect(await attempt(second, 'wrong four')).to.equal(429);
    expect(await attempt(first, 'wrong five')).to.equal(429);
    // Another deployment (another session secret) on the same database has its own counters.
    expect(await attempt(stranger, 'wrong six')).to.equal(401);

    const rows = await withClient(await suiteDatabaseUrl(), (c) => c.query<{ key: string; hits: number }>("select key, hits from rate_limit_counters where key like '%:signin:%'"));
    expect(rows.rows.length).to.be.at.least(2);
    for (const row of rows.rows) expect(row.key, 'the secret itself is never stored').not.to.include(secret);
  });

  it('starts counting again when the window has ended', async () => {
    const quickSecret = randomBytes(24).toString('base64url');
    const quick = { windowMs: 1_500, limit: 1 };
    const url = await suiteDatabaseUrl();
    const one = openAppOn(url, { sessionSecret: quickSecret, authRateLimit: quick });
    const two = openAppOn(url, { sessionSecret: quickSecret, authRateLimit: quick });
    try {
      expect(await attempt(one, 'wrong')).to.equal(401);
      expect(await attempt(two, 'wrong')).to.equal(429);
      await sleep(quick.windowMs + 500);
      expect(await attempt(two, 'wrong')).to.equal(401);
      expect(await attempt(one, 'wrong')).to.equal(429);
    } finally {
      await one.close();
      await two.close();
    }
  });

  it('serves many simultaneous readers of one published link behind one address, and still limits guessing', async () => {
    const harness = await openServiceApp({ publicRateLimit: { windowMs: 60_000, failures: 5 } });
    try {
      const team = await teamOfRoles(harness, 'Busy Link');
      const sheet = await createBoreWorksheet(team.clients.editor, team.teamId);
      const { body } = await team.clients.owner.post(`/api/revisions/${sheet.revision.id}/links`, {}).expect(201);
      // 80 readers at once, more than the failure limit and the 60 a per-request count allowed.
      const readers = Array.from({ length: 80 }, () => new Client(harness.app));
      const statuses = await Promise.all(readers.map(async (r) => (await r.get(`/api/public/${body.token}`)).status));
      expect(statuses.filter((s) => s !== 200), 'readers refused').to.deep.equal([]);
      const guesser = new Client(harness.app);
      const guesses: number[] = [];
      for (let i = 0; i < 7; i++) guesses.push((await guesser.get(`/api/public/${randomBytes(32).toString('base64url')}`)).status);
      expect(guesses).to.deep.equal([404, 404, 404, 404, 404, 429, 429]);
      const refused = await guesser.get(`/api/public/${randomBytes(32).toString('base64url')}`).expect(429);
      expect(Number(refused.headers['retry-after'])).to.be.within(1, 60);
    } finally {
      await harness.close();
    }
  });
});
