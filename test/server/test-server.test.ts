import { expect } from 'chai';
import pg from 'pg';
import { adminUrl } from '../support/db';
import { startTestServer } from '../support/server';

/** Session cookie and CSRF token handling with plain fetch, as a browser would. */
async function signIn(base: string, email: string, password: string) {
  const session = await fetch(`${base}/api/auth/session`);
  const cookie = session.headers.getSetCookie()[0].split(';')[0];
  const { csrfToken } = (await session.json()) as { csrfToken: string };
  const res = await fetch(`${base}/api/auth/signin`, {
    method: 'POST',
    headers: { 'content-type': 'application/json', 'x-csrf-token': csrfToken, cookie },
    body: JSON.stringify({ email, password }),
  });
  return { res, cookie: res.headers.getSetCookie()[0]?.split(';')[0] ?? cookie };
}

async function databaseExists(name: string): Promise<boolean> {
  const client = new pg.Client({ connectionString: await adminUrl() });
  await client.connect();
  try {
    return ((await client.query('select 1 from pg_database where datname = $1', [name])).rowCount ?? 0) > 0;
  } finally {
    await client.end();
  }
}

describe('test server process (test/support/server.ts)', function () {
  this.timeout(60_000);

  it('runs the real server on loopback with the demo seed, and stop() ends it and drops its database', async () => {
    const server = await startTestServer();
    const databaseName = new URL(server.databaseUrl).pathname.slice(1);
    try {
      expect(server.url).to.match(/^http:\/\/127\.0\.0\.1:\d+$/);
      const health = await fetch(`${server.url}/api/health`);
      expect(await health.json()).to.deep.equal({ ok: true });

      const { res, cookie } = await signIn(server.url, 'ines.okafor@harrowvale.test', 'spreadproof-demo');
      expect(res.status, server.output()).to.equal(200);
      const teams = await fetch(`${server.url}/api/teams`, { headers: { cookie } });
      expect(await teams.json()).to.have.nested.property('teams[0].name', 'Metrology Lab');
      expect(await databaseExists(databaseName)).to.equal(true);
    } finally {
      await server.stop();
    }
    expect(await databaseExists(databaseName)).to.equal(false);
    const refused = await fetch(`${server.url}/api/health`).then(
      () => false,
      () => true,
    );
    expect(refused, 'the server no longer answers').to.equal(true);
  });

  it('starts without the seed when asked', async () => {
    const server = await startTestServer({ seed: false });
    try {
      const { res } = await signIn(server.url, 'ines.okafor@harrowvale.test', 'spreadproof-demo');
      expect(res.status).to.equal(401);
    } finally {
      await server.stop();
    }
  });
});
