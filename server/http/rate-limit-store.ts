/**
 * A PostgreSQL store for express-rate-limit, so that the limits hold for a deployment and not per
 * process: with several server processes behind a load balancer, ten failed sign-ins are ten
 * whichever process answered them. (express-rate-limit's default MemoryStore counts per process.)
 *
 * One upsert per counted request, atomic in the database: a counter whose window has ended starts
 * again at 1, otherwise it grows by one. Expired rows are deleted now and then by the store itself.
 *
 * Counters are scoped to a deployment: processes that share the database *and* the session secret
 * (which they must share anyway, or a session cookie from one process is refused by the next)
 * count together. Two apps with different secrets on one database — the test suites do this —
 * count apart.
 */
import type { Options, Store, ClientRateLimitInfo } from 'express-rate-limit';
import { sql } from 'drizzle-orm';
import { sha256Hex } from '@shared/engine/hash';
import type { Database } from '../db/client';

/** Gives each rate limiter of the app its store; `name` tells the limiters apart. */
export type RateLimitStores = (name: string) => Store;

/** Prune expired rows about once per this many increments (per store). */
const PRUNE_EVERY = 500;

export class PostgresRateLimitStore implements Store {
  /** Counters are in the database: an increment in one process is seen by all. */
  readonly localKeys = false;
  readonly prefix: string;
  private windowMs = 60_000;
  private increments = 0;

  constructor(
    private readonly db: Database,
    scope: string,
    name: string,
  ) {
    this.prefix = `${scope}:${name}:`;
  }

  init(options: Options): void {
    this.windowMs = options.windowMs;
  }

  async get(key: string): Promise<ClientRateLimitInfo | undefined> {
    const { rows } = await this.db.execute<{ hits: number; reset_at: Date }>(
      sql`select hits, reset_at from rate_limit_counters where key = ${this.prefix + key} and reset_at > now()`,
    );
    const row = rows[0];
    return row ? { totalHits: row.hits, resetTime: new Date(row.reset_at) } : undefined;
  }

  async increment(key: string): Promise<ClientRateLimitInfo> {
    if (++this.increments % PRUNE_EVERY === 0) void this.prune().catch(() => {});
    const { rows } = await this.db.execute<{ hits: number; reset_at: Date }>(sql`
      insert into rate_limit_counters as c (key, hits, reset_at)
      values (${this.prefix + key}, 1, now() + make_interval(secs => ${this.windowMs / 1000}))
      on conflict (key) do update set
        hits = case when c.reset_at <= now() then 1 else c.hits + 1 end,
        reset_at = case when c.reset_at <= now() then excluded.reset_at else c.reset_at end
      returning hits, reset_at`);
    return { totalHits: rows[0].hits, resetTime: new Date(rows[0].reset_at) };
  }

  async decrement(key: string): Promise<void> {
    await this.db.execute(
      sql`update rate_limit_counters set hits = greatest(hits - 1, 0) where key = ${this.prefix + key} and reset_at > now()`,
    );
  }

  async resetKey(key: string): Promise<void> {
    await this.db.execute(sql`delete from rate_limit_counters where key = ${this.prefix + key}`);
  }

  async resetAll(): Promise<void> {
    await this.db.execute(sql`delete from rate_limit_counters where starts_with(key, ${this.prefix})`);
  }

  private async prune(): Promise<void> {
    await this.db.execute(sql`delete from rate_limit_counters where reset_at < now() - interval '1 minute'`);
  }
}

/** Stores for every limiter of an app, counting together with the other processes of its deployment. */
export function postgresRateLimitStores(db: Database, sessionSecret: string): RateLimitStores {
  // The digest names the deployment without putting anything secret into the table.
  const scope = sha256Hex(`spreadproof rate limits\n${sessionSecret}`).slice(0, 16);
  return (name) => new PostgresRateLimitStore(db, scope, name);
}
