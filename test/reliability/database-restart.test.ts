/**
 * The server outlives its database: a real server process runs on a PostgreSQL cluster of this
 * suite's own (created under .data/, so that stopping it disturbs no other suite), the cluster is
 * stopped and started again, and the same process — never restarted — answers again: the session
 * from before still works, revisions read back complete and saves succeed. While the database is
 * down, the process stays up and answers JSON errors, not hangs. Then every backend of the
 * server's database is killed with pg_terminate_backend; again the process recovers by itself.
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
