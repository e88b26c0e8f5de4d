/**
 * The server outlives its database: a real server process runs on a PostgreSQL cluster of this
 * suite's own (created under .data/, so that stopping it disturbs no other suite), the cluster is
 * stopped and started again, and the same process — never restarted — answers again: the session
 * from before still works, revisions read back complete and saves succeed. While the database is
 * down, the process stays up and answers JSON errors, not hangs. Then every backend of the
 * server's database is killed with pg_terminate_backend; again the process recovers by itself.
 * A visitor without a session gets 503 while the session store is down, never a CSRF token of a
 * session that was never stored, and a working one once the database is back.
 */
import { randomBytes } from 'node:crypto';
import { rmSync } from 'node:fs';
import net from 'node:net';
import path from 'node:path';
import { expect } from 'chai';
import { boreDocument } from '../server/worksheets-support';
import { demoOwner, SessionClient } from '../../bench/support/session-client';
import { openMigrated } from '../../server/main';
import { seedDemo } from '../../server/db/seed';
import { ensureCluster, stopCluster, type ClusterConfig } from '../../server/db/cluster';
import { dataDir } from '../../server/paths';
import { startTestServer, type TestServer } from '../support/server';
import { eventually, hashesOfAnswer, withClient } from './support';

function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const server = net.createServer();
    server.once('error', reject);
    server.listen(0, '127.0.0.1', () => {
      const { port } = server.address() as net.AddressInfo;
      server.close(() => resolve(port));
    });
  });
}

describe('reliability: the server recovers when PostgreSQL restarts', function () {
  this.timeout(300_000);
  let cluster: ClusterConfig;
  let url: string;
  let server: TestServer | undefined;
  let client: SessionClient;
  let worksheetId: string;
  let head: string;

  before(async () => {
    cluster = {
      label: 'restart-test',
      dataDir: path.join(dataDir, `restart-test-pg-${process.pid}-${randomBytes(3).toString('hex')}`),
      port: await freePort(),
      database: 'spreadproof',
      settings: { fsync: 'off', synchronous_commit: 'off', full_page_writes: 'off' },
    };
    url = (await ensureCluster(cluster)).url;
    const database = await openMigrated(url);
    try {
      await seedDemo(database.db);
    } finally {
      await database.close();
    }
    server = await startTestServer({ databaseUrl: url });
    client = new SessionClient(server.url);
    await client.signIn(demoOwner.email, demoOwner.password);
    const teamId = (await client.get('/api/teams')).body.teams[0].id;
    const created = SessionClient.expect(await client.post(`/api/teams/${teamId}/worksheets`, { source: 'blank', title: 'Outage study' }), 201, 'create');
    worksheetId = created.body.worksheet.id;
    const saved = SessionClient.expect(
      await client.post(`/api/worksheets/${worksheetId}/revisions`, { baseRevisionId: created.body.head.id, document: boreDocument({ title: 'Outage study' }) }),
      201,
      'save',
    );
    head = saved.body.revision.id;
  });

  after(async () => {
    await server?.stop();
    if (cluster) {
      await stopCluster(cluster).catch(() => {});
      rmSync(cluster.dataDir, { recursive: true, force: true });
      rmSync(`${cluster.dataDir}.password`, { force: true });
    }
  });

  async function savesAgain(levels: number[]): Promise<void> {
    const res = await client.post(`/api/worksheets/${worksheetId}/revisions`, { baseRevisionId: head, document: boreDocument({ title: 'Outage study', levels }) });
    SessionClient.expect(res, 201, 'save after recovery');
    head = res.body.revision.id;
    const read = SessionClient.expect(await client.get(`/api/revisions/${head}`), 200, 'read after recovery');
    const recomputed = hashesOfAnswer(read.body.revision);
    expect(recomputed.contentHash).to.equal(read.body.revision.contentHash);
    expect(recomputed.resultsHash).to.equal(read.body.revision.resultsHash);
  }

  it('stays up while the cluster is stopped and serves again once it is started, without its own restart', async () => {
    const pid = server!.pid;
    await stopCluster(cluster);

    // Down: the process answers (JSON errors for what needs the database), it does not exit or hang.
    // (Without a cookie: with one, even /api/health would first look the session up.)
    const anonymous = new SessionClient(server!.url);
    const answers = [await anonymous.get('/api/health')];
    for (const path of [`/api/revisions/${head}`, '/api/worksheets', '/api/auth/session']) answers.push(await client.get(path));
    answers.push(await client.post(`/api/worksheets/${worksheetId}/revisions`, { baseRevisionId: head, document: boreDocument({ title: 'Outage study', levels: [0.8] }) }));
    for (const res of answers) {
      expect(res.status, res.text).to.equal(503);
      expect(res.body.error.code).to.equal('database_unavailable');
      expect(res.body.error.message).to.match(/database cannot be reached/);
      expect(res.headers.get('retry-after')).to.equal('5');
    }
    expect(server!.output()).not.to.match(/exited|Unhandled/i);

    await ensureCluster(cluster);
    const attempts = await eventually(async () => (await client.get(`/api/revisions/${head}`)).status === 200, 30_000, 'reading a revision after the restart');
    expect(attempts).to.be.lessThan(150);
    const session = await client.get('/api/auth/session');
    expect(session.body.user?.email, 'the session from before the restart').to.equal(demoOwner.email);
    await savesAgain([0.9]);
    expect(server!.pid).to.equal(pid);
    process.kill(pid, 0); // still the same, living process
  });

  it('refuses to hand out a session it cannot store (503, no cookie) and hands out working ones again after the restart', async () => {
    const pid = server!.pid;
    const before = server!.output().length;
    await stopCluster(cluster);

    // A visitor without a cookie: the session (and its CSRF token) would be new and must be stored
    // before the token is worth anything. With the store unreachable the answer is the outage, not
    // 200 with a token of a session that was never saved.
    for (let i = 0; i < 3; i++) {
      const visitor = new SessionClient(server!.url);
      const res = await visitor.get('/api/auth/session');
      expect(res.status, res.text).to.equal(503);
      expect(res.body.error.code).to.equal('database_unavailable');
      expect(res.body.error.message).to.match(/database cannot be reached/);
      expect(res.body.error.message).to.match(/try again/);
      expect(res.body).not.to.have.property('csrfToken');
      expect(res.body.error).not.to.have.property('stack');
      expect(res.headers.get('retry-after')).to.equal('5');
      expect(res.headers.getSetCookie(), 'no cookie for a session that was not stored').to.deep.equal([]);
    }
    // The signed-in client's session cannot be read either: the same 503, never "signed out".
    const signedIn = await client.get('/api/auth/session');
    expect(signedIn.status, signedIn.text).to.equal(503);
    expect(signedIn.body.error.code).to.equal('database_unavailable');
    const during = server!.output().slice(before);
    expect(during, 'server output while down').not.to.match(/unhandled error|exited|Unhandled/i);

    await ensureCluster(cluster);
    const visitor = new SessionClient(server!.url);
    await eventually(async () => (await visitor.get('/api/auth/session')).status === 200, 30_000, 'a new session after the restart');
    const fresh = await visitor.get('/api/auth/session');
    expect(fresh.status, fresh.text).to.equal(200);
    expect(fresh.body.user).to.equal(null);
    expect(fresh.body.csrfToken).to.be.a('string').with.length.greaterThan(20);
    expect(visitor.cookie, 'the session cookie of the stored session').to.match(/^spreadproof\.sid=/);
    // The token works: it belongs to a session the store can read back (sign-in checks it).
    visitor.token = fresh.body.csrfToken;
    const signIn = await visitor.post('/api/auth/signin', { email: demoOwner.email, password: demoOwner.password });
    expect(signIn.status, signIn.text).to.equal(200);
    expect(signIn.body.user.email).to.equal(demoOwner.email);
    // And the session from before the outage is still there.
    const again = await client.get('/api/auth/session');
    expect(again.body.user?.email).to.equal(demoOwner.email);
    expect(server!.pid).to.equal(pid);
    process.kill(pid, 0);
  });

  it('recovers when every backend of its database is terminated', async () => {
    await ensureCluster(cluster);
    await eventually(async () => (await client.get(`/api/revisions/${head}`)).status === 200, 30_000, 'reading before pg_terminate_backend');
    const pid = server!.pid;
    const terminated = await withClient(url, async (admin) => {
      const { rows } = await admin.query<{ n: number }>(
        'select count(*)::int as n from (select pg_terminate_backend(pid) from pg_stat_activity where datname = current_database() and pid <> pg_backend_pid()) t',
      );
      return rows[0].n;
    });
    expect(terminated, 'the server held connections to terminate').to.be.greaterThan(0);
    await eventually(async () => (await client.get(`/api/revisions/${head}`)).status === 200, 20_000, 'reading after pg_terminate_backend');
    await savesAgain([0.95, 0.99]);
    expect(server!.pid).to.equal(pid);
    process.kill(pid, 0);
  });
});
