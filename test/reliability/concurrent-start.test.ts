/**
 * Scale-out: several server processes starting at once on one empty database (a deployment behind
 * a load balancer) must not race each other's migrations. Each opens its own pool and migrates;
 * all succeed and every committed migration is applied exactly once (drizzle's journal of applied
 * migrations, and the tables they create). Common practice (advisory lock around migrations); no
 * outside source.
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { expect } from 'chai';
import pg from 'pg';
import { openDatabase } from '../../server/db/client';
import { runMigrations } from '../../server/db/migrate';
import { migrationsFolder } from '../../server/paths';
import { createTestDatabase, type TestDatabase } from '../support/db';

describe('reliability: processes migrating one database at the same time', function () {
  this.timeout(120_000);
  let database: TestDatabase | undefined;

  after(async () => {
    await database?.drop();
  });

  it('applies every migration once while four pools migrate concurrently', async () => {
    database = await createTestDatabase({ migrate: false });
    const handles = Array.from({ length: 4 }, () => openDatabase(database!.url, { max: 3 }));
    try {
      const outcomes = await Promise.allSettled(handles.map((h) => runMigrations(h.db)));
      expect(outcomes.map((o) => (o.status === 'rejected' ? String(o.reason) : 'ok'))).to.deep.equal(['ok', 'ok', 'ok', 'ok']);
    } finally {
      await Promise.all(handles.map((h) => h.close()));
    }
    const journal = JSON.parse(readFileSync(path.join(migrationsFolder, 'meta', '_journal.json'), 'utf8')) as { entries: unknown[] };
    const client = new pg.Client({ connectionString: database.url });
    await client.connect();
    try {
      const applied = await client.query<{ hash: string }>('select hash from drizzle.__drizzle_migrations');
      expect(applied.rows).to.have.length(journal.entries.length);
      expect(new Set(applied.rows.map((r) => r.hash)).size).to.equal(journal.entries.length);
      const tables = await client.query<{ n: string }>("select count(*) as n from pg_tables where schemaname = 'public' and tablename = 'revisions'");
      expect(Number(tables.rows[0].n)).to.equal(1);
    } finally {
      await client.end();
    }
  });
});
