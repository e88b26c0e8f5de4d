/**
 * Fresh, migrated PostgreSQL databases for tests, on the test cluster (127.0.0.1:54339, data in
 * .data/test-pg) or, under `npm test` with DATABASE_URL set, on that server. Each is dropped by
 * `drop()`.
 *
 *     const database = await createTestDatabase();   // { url, drop() }
 *     ...
 *     await database.drop();
 *
 * Suites that just need "a database for this run" use `suiteDatabaseUrl()` instead.
 */
import { randomBytes } from 'node:crypto';
import pg from 'pg';
import { openDatabase } from '../../server/db/client';
import { ensureCluster, quoteIdent, testCluster } from '../../server/db/cluster';
import { runMigrations } from '../../server/db/migrate';

export interface TestDatabase {
  url: string;
  name: string;
  drop(): Promise<void>;
}

/** Set by test/run.ts: the server on which per-test databases are created. */
export const adminUrlVariable = 'SPREADPROOF_TEST_ADMIN_URL';
/** Set by test/run.ts: DATABASE_URL is the run's own fresh database and may be written freely. */
export const testRunVariable = 'SPREADPROOF_TEST_RUN';

let adminUrlPromise: Promise<string> | undefined;

/** The server to create test databases on: the harness's choice, or the test cluster (started if needed). */
export function adminUrl(): Promise<string> {
  adminUrlPromise ??= process.env[adminUrlVariable]
    ? Promise.resolve(process.env[adminUrlVariable]!)
    : ensureCluster(testCluster).then((cluster) => cluster.url);
  return adminUrlPromise;
}

function withDatabase(url: string, database: string): string {
  const parsed = new URL(url);
  parsed.pathname = `/${database}`;
  return parsed.toString();
}

export async function createTestDatabase(options: { migrate?: boolean } = {}): Promise<TestDatabase> {
  const admin = await adminUrl();
  const name = `spreadproof_test_${process.pid}_${randomBytes(4).toString('hex')}`;
  await adminQuery(admin, `create database ${quoteIdent(name)}`);
  const url = withDatabase(admin, name);
  if (options.migrate ?? true) {
    const handle = openDatabase(url, { max: 2 });
    try {
      await runMigrations(handle.db);
    } finally {
      await handle.close();
    }
  }
  let dropped = false;
  return {
    url,
    name,
    async drop() {
      if (dropped) return;
      dropped = true;
      await adminQuery(admin, `drop database if exists ${quoteIdent(name)} with (force)`);
    },
  };
}

async function adminQuery(admin: string, sql: string): Promise<void> {
  const client = new pg.Client({ connectionString: admin });
  await client.connect();
  try {
    await client.query(sql);
  } finally {
    await client.end();
  }
}

let suiteDatabase: Promise<TestDatabase> | undefined;

/**
 * The run's database: DATABASE_URL under `npm test`; run directly (`npx mocha --import tsx …`) a
 * fresh one of its own (left for the next `npm test` to drop). Never a DATABASE_URL meant for the
 * development server.
 */
export async function suiteDatabaseUrl(): Promise<string> {
  if (process.env[testRunVariable] && process.env.DATABASE_URL) return process.env.DATABASE_URL;
  suiteDatabase ??= createTestDatabase();
  return (await suiteDatabase).url;
}

/**
 * Drops test databases left behind by processes that no longer run (a run cut short, or suites run
 * directly). Databases of live processes — another run in progress — are kept.
 */
export async function dropStaleTestDatabases(): Promise<string[]> {
  const admin = await adminUrl();
  const client = new pg.Client({ connectionString: admin });
  await client.connect();
  const dropped: string[] = [];
  try {
    const { rows } = await client.query<{ datname: string }>(
      "select datname from pg_database where datname like 'spreadproof\\_test\\_%'",
    );
    for (const { datname } of rows) {
      const pid = Number(/^spreadproof_test_(\d+)_/.exec(datname)?.[1]);
      if (Number.isInteger(pid) && pid > 0 && isAlive(pid)) continue;
      await client.query(`drop database if exists ${quoteIdent(datname)} with (force)`);
      dropped.push(datname);
    }
  } finally {
    await client.end();
  }
  return dropped;
}

function isAlive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (error) {
    return (error as NodeJS.ErrnoException).code === 'EPERM';
  }
}
