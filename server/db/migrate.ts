import { migrate } from 'drizzle-orm/node-postgres/migrator';
import type pg from 'pg';
import { migrationsFolder } from '../paths';
import type { Database } from './client';

/** Key of the advisory lock that lets one process at a time migrate a database. */
const MIGRATION_LOCK = 0x5370_7264; // "Sprd"

/**
 * Applies the committed SQL migrations in schema/migrations that this database has not seen yet.
 *
 * Several server processes may start at once on one database (a deployment behind a load
 * balancer): one migrates while the others wait on a transaction-scoped advisory lock, then find
 * nothing left to do. The lock is held by an open transaction on a connection of its own, which
 * also pins the server connection behind a pooler in transaction mode. Needs a pool of at least
 * two connections.
 */
export async function runMigrations(db: Database): Promise<void> {
  const pool = (db as Database & { $client: pg.Pool }).$client;
  const lock = await pool.connect();
  try {
    await lock.query('begin');
    await lock.query('select pg_advisory_xact_lock($1)', [MIGRATION_LOCK]);
    await migrate(db, { migrationsFolder });
    await lock.query('commit');
  } catch (error) {
    await lock.query('rollback').catch(() => undefined);
    throw error;
  } finally {
    lock.release();
  }
}
