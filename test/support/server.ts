/**
 * A real server process for end-to-end tests: `node --import tsx server/main.ts` on a free loopback
 * port, on a fresh migrated (and by default seeded) database that `stop()` drops. It serves the
 * built client from dist/client when there is one (test/run.ts builds it before the browser suites).
 *
 *     const server = await startTestServer();        // { url, databaseUrl, stop(), output() }
 *     await page.goto(server.url);
 *     ...
 *     await server.stop();
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import path from 'node:path';
import { openDatabase } from '../../server/db/client';
import { seedDemo } from '../../server/db/seed';
import { listeningPrefix } from '../../server/main';
import { projectRoot } from '../../server/paths';
import { createTestDatabase } from './db';

export interface TestServer {
  url: string;
  databaseUrl: string;
  /** Everything the process printed so far (for failure messages). */
  output(): string;
  stop(): Promise<void>;
  /** Process id of the server (for tests that signal it themselves). */
  pid: number;
  /** Sends `signal` (default SIGKILL) and waits for the exit; the database is kept until stop(). */
  kill(signal?: NodeJS.Signals): Promise<void>;
}

export interface TestServerOptions {
  /** Seed the demo team and users (default true). */
  seed?: boolean;
  /** Failed sign-ins / sign-ups allowed per 15 minutes (default 100, so suites are not throttled). */
  authRateLimit?: number;
  env?: Record<string, string>;
  startTimeoutMs?: number;
  /** Extra node options for the server process (e.g. --cpu-prof for the load script's profiles). */
  nodeArgs?: string[];
  /**
   * Serve an existing (migrated) database instead of a fresh one, e.g. a second process on the
   * first one's database, or a restart after a crash. It is not seeded and stop() does not drop it.
   */
  databaseUrl?: string;
}

export async function startTestServer(options: TestServerOptions = {}): Promise<TestServer> {
  const database = options.databaseUrl
    ? { url: options.databaseUrl, drop: async () => {} }
    : await createTestDatabase();
  let child: ChildProcess | undefined;
  try {
    if (!options.databaseUrl && (options.seed ?? true)) {
      const handle = openDatabase(database.url, { max: 2 });
      try {
        await seedDemo(handle.db);
      } finally {
        await handle.close();
      }
    }

    child = spawn(process.execPath, [...(options.nodeArgs ?? []), '--import', 'tsx', path.join('server', 'main.ts')], {
      cwd: projectRoot,
      stdio: ['ignore', 'pipe', 'pipe'],
      env: {
        ...process.env,
        DATABASE_URL: database.url,
        PORT: '0',
        NODE_ENV: 'test',
        LOG_LEVEL: process.env.LOG_LEVEL ?? 'warn',
        SESSION_SECRET: randomBytes(24).toString('base64url'),
        SPREADPROOF_AUTH_RATE_LIMIT: String(options.authRateLimit ?? 100),
        ...options.env,
      },
    });
    const running = child;
    let output = '';
    const url = await new Promise<string>((resolve, reject) => {
      const timer = setTimeout(
        () => reject(new Error(`The test server did not start within ${options.startTimeoutMs ?? 30000} ms:\n${output}`)),
        options.startTimeoutMs ?? 30000,
      );
      const onData = (chunk: Buffer) => {
        output += chunk.toString();
        const line = output.split('\n').find((l) => l.startsWith(listeningPrefix));
        if (line) {
          clearTimeout(timer);
          resolve(line.slice(listeningPrefix.length).trim());
        }
      };
      running.stdout!.on('data', onData);
      running.stderr!.on('data', onData);
      running.once('exit', (code, signal) => {
        clearTimeout(timer);
        reject(new Error(`The test server exited (${code ?? signal}) before listening:\n${output}`));
      });
    });

    let stopped: Promise<void> | undefined;
    return {
      url,
      databaseUrl: database.url,
      output: () => output,
      pid: running.pid!,
      kill: (signal = 'SIGKILL') =>
        new Promise<void>((resolve) => {
          if (running.exitCode !== null || running.signalCode !== null) return resolve();
          running.once('exit', () => resolve());
          running.kill(signal);
        }),
      stop: () =>
        (stopped ??= (async () => {
          await terminate(running);
          await database.drop();
        })()),
    };
  } catch (error) {
    if (child) await terminate(child);
    await database.drop();
    throw error;
  }
}

function terminate(child: ChildProcess): Promise<void> {
  if (child.exitCode !== null || child.signalCode !== null) return Promise.resolve();
  return new Promise((resolve) => {
    const killer = setTimeout(() => child.kill('SIGKILL'), 5000);
    child.once('exit', () => {
      clearTimeout(killer);
      resolve();
    });
    child.kill('SIGTERM');
  });
}
