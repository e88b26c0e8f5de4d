/**
 * The project cluster's life cycle on a throwaway data directory and a free port: created on first
 * use, reused (quick, not re-created) while running, rows kept across stop and start.
 */
import { mkdtempSync, rmSync, statSync } from 'node:fs';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { expect } from 'chai';
import pg from 'pg';
import { ClusterError, ensureCluster, stopCluster, type ClusterConfig } from '../../server/db/cluster';

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

async function query(url: string, sql: string): Promise<pg.QueryResult> {
  const client = new pg.Client({ connectionString: url });
  await client.connect();
  try {
    return await client.query(sql);
  } finally {
    await client.end();
  }
}

describe('project PostgreSQL cluster', function () {
  this.timeout(120_000);
  let parent: string;
  let config: ClusterConfig;

  before(async () => {
    parent = mkdtempSync(path.join(os.tmpdir(), 'spreadproof-cluster-'));
    config = { label: 'throwaway', dataDir: path.join(parent, 'pg'), port: await freePort(), database: 'lifecycle', settings: { fsync: 'off' } };
  });
  after(async () => {
    await stopCluster(config).catch(() => {});
    rmSync(parent, { recursive: true, force: true });
  });

  it('creates the cluster on first use, listening on loopback with a password', async () => {
    const messages: string[] = [];
    const { url, started } = await ensureCluster(config, (m) => messages.push(m));
    expect(started).to.equal(true);
    expect(messages.join('\n')).to.match(/Creating/);
    expect(new URL(url).hostname).to.equal('127.0.0.1');
    expect(new URL(url).password).to.have.length.greaterThan(20);
    expect(statSync(`${config.dataDir}.password`).mode & 0o077, 'password file readable by others').to.equal(0);
    const { rows } = await query(url, "select current_setting('listen_addresses') as listen, current_database() as db");
    expect(rows[0]).to.deep.equal({ listen: '127.0.0.1', db: 'lifecycle' });
    await query(url, 'create table kept (value text); insert into kept values (\'still here\')');
  });

  it('reuses the running cluster without creating or starting anything', async () => {
    const messages: string[] = [];
    const { started } = await ensureCluster(config, (m) => messages.push(m));
    expect(started).to.equal(false);
    expect(messages).to.deep.equal([]);
  });

  it('refuses a wrong password', async () => {
    const { url } = await ensureCluster(config);
    const wrong = new URL(url);
    wrong.password = 'not-the-password';
    let failed = false;
    await query(wrong.toString(), 'select 1').catch(() => {
      failed = true;
    });
    expect(failed).to.equal(true);
  });

  it('stops, starts again without re-creating, and keeps the rows', async () => {
    expect(await stopCluster(config)).to.equal(true);
    expect(await stopCluster(config)).to.equal(false);
    const messages: string[] = [];
    const { url, started } = await ensureCluster(config, (m) => messages.push(m));
    expect(started).to.equal(true);
    expect(messages.join('\n')).not.to.match(/Creating/);
    const { rows } = await query(url, 'select value from kept');
    expect(rows).to.deep.equal([{ value: 'still here' }]);
  });

  it('says so clearly when its port is taken by another process', async () => {
    await stopCluster(config);
    const blocker = net.createServer().listen(config.port, '127.0.0.1');
    await new Promise((resolve) => blocker.once('listening', resolve));
    try {
      let error: unknown;
      await ensureCluster(config).catch((e) => {
        error = e;
      });
      expect(error).to.be.instanceOf(ClusterError);
      expect((error as Error).message).to.contain(`Port ${config.port}`);
    } finally {
      await new Promise((resolve) => blocker.close(resolve));
    }
  });
});
