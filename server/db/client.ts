import { drizzle, type NodePgDatabase } from 'drizzle-orm/node-postgres';
import pg from 'pg';
import * as schema from '../../schema/index';

export type Schema = typeof schema;
/** The Drizzle handle every handler uses (`ctx.db` in route handlers). */
export type Database = NodePgDatabase<Schema>;
/** A transaction handle, usable wherever a Database is. */
export type Transaction = Parameters<Parameters<Database['transaction']>[0]>[0];

export interface DatabaseHandle {
  db: Database;
  pool: pg.Pool;
  close(): Promise<void>;
}

/**
 * Connections per server process: DATABASE_POOL_MAX (default 10). With several processes, their
 * sum must stay below the server's max_connections (or go through a pooler; README, scale-out).
 */
export function poolSizeFromEnv(env: NodeJS.ProcessEnv = process.env): number {
  const raw = env.DATABASE_POOL_MAX?.trim();
  if (!raw) return 10;
  const value = Number(raw);
  if (!Number.isInteger(value) || value < 1 || value > 1000) throw new Error(`DATABASE_POOL_MAX must be a whole number from 1 to 1000 (got "${raw}").`);
  return value;
}

export function openDatabase(url: string, options: { max?: number } = {}): DatabaseHandle {
  const pool = new pg.Pool({ connectionString: url, max: options.max ?? poolSizeFromEnv() });
  // An idle client losing its connection (server restart) must not crash the process.
  pool.on('error', () => {});
  const db = drizzle(pool, { schema });
  return { db, pool, close: () => pool.end() };
}

/** Database name of a URL, for messages (never print the URL itself: it carries a password). */
export function databaseName(url: string): string {
  return decodeURIComponent(new URL(url).pathname.replace(/^\//, '')) || '(default)';
}
