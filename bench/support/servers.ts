/**
 * Servers for the benchmarks and the load script: a real `server/main.ts` process on a fresh,
 * migrated and seeded database on loopback (test/support/server.ts), dropped when it stops.
 *
 * The database lives, by default, in the development cluster (.data/pg), whose settings are
 * PostgreSQL's durable defaults (fsync and synchronous commit on) as in production; `--cluster
 * test` uses the test cluster instead (fsync off: faster saves than any real installation).
 */
import { spawn } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { devCluster, ensureCluster, testCluster } from '../../server/db/cluster';
import { adminUrlVariable } from '../../test/support/db';
import { startTestServer, type TestServer } from '../../test/support/server';

export type ClusterChoice = 'dev' | 'test';

export function clusterChoice(argv = process.argv): ClusterChoice {
  const at = argv.indexOf('--cluster');
  return at >= 0 && argv[at + 1] === 'test' ? 'test' : 'dev';
}

let prepared: ClusterChoice | undefined;

/** Points the test-database helper at the chosen cluster (DATABASE_URL's server wins when set). */
export async function useCluster(choice: ClusterChoice, log: (m: string) => void = console.log): Promise<string> {
  if (process.env.DATABASE_URL) {
    process.env[adminUrlVariable] = process.env.DATABASE_URL;
    prepared = choice;
    return 'the server of DATABASE_URL';
  }
  const cluster = choice === 'test' ? testCluster : devCluster;
  const { url } = await ensureCluster(cluster, log);
  process.env[adminUrlVariable] = url;
  prepared = choice;
  return choice === 'test' ? `test cluster 127.0.0.1:${cluster.port} (fsync off)` : `development cluster 127.0.0.1:${cluster.port} (durable defaults)`;
}

/** A server process on a fresh seeded database; sign-in limits high enough for many clients. */
export async function benchServer(env: Record<string, string> = {}, nodeArgs: string[] = []): Promise<TestServer> {
  if (!prepared) await useCluster(clusterChoice());
  return startTestServer({ authRateLimit: 100_000, env: { LOG_LEVEL: 'silent', ...env }, startTimeoutMs: 120_000, nodeArgs });
}

/**
 * A bare node:http server that answers every request with `body` (the comparison floor), in a
 * process of its own like the app server, so that neither shares an event loop with the load
 * generator.
 */
export async function bareServer(body: Buffer, contentType: string): Promise<{ url: string; pid: number; close(): Promise<void> }> {
  const dir = mkdtempSync(path.join(os.tmpdir(), 'spreadproof-bare-'));
  const file = path.join(dir, 'body');
  writeFileSync(file, body);
  const program = `
    const http = require('node:http');
    const body = require('node:fs').readFileSync(process.argv[1]);
    const type = process.argv[2];
    const server = http.createServer((req, res) => {
      res.writeHead(200, { 'content-type': type, 'content-length': body.length });
      res.end(body);
    });
    server.listen(0, '127.0.0.1', () => console.log('PORT ' + server.address().port));
    process.on('SIGTERM', () => server.close(() => process.exit(0)));`;
  const child = spawn(process.execPath, ['-e', program, file, contentType], { stdio: ['ignore', 'pipe', 'inherit'] });
  const port = await new Promise<number>((resolve, reject) => {
    let out = '';
    child.stdout!.on('data', (chunk: Buffer) => {
      out += chunk.toString();
      const match = /PORT (\d+)/.exec(out);
      if (match) resolve(Number(match[1]));
    });
    child.once('exit', (code) => reject(new Error(`the bare server exited (${code})`)));
  });
  return {
    url: `http://127.0.0.1:${port}`,
    pid: child.pid!,
    close: () =>
      new Promise<void>((resolve) => {
        child.removeAllListeners('exit');
        child.once('exit', () => {
          rmSync(dir, { recursive: true, force: true });
          resolve();
        });
        child.kill('SIGTERM');
      }),
  };
}
