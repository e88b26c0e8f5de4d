import { migrate } from 'drizzle-orm/node-postgres/migrator';
import { migrationsFolder } from '../paths';
import type { Database } from './client';

/** Applies the committed SQL migrations in schema/migrations that this database has not seen yet. */
export async function runMigrations(db: Database): Promise<void> {
  await migrate(db, { migrationsFolder });
}
