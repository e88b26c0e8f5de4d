import { index, integer, pgTable, text, timestamp } from 'drizzle-orm/pg-core';

/**
 * Hit counters of the rate limiters (failed sign-ins, sign-ups, guessed published-link tokens, mail
 * requests), kept in PostgreSQL so that every server process of one deployment counts together:
 * behind a load balancer, a guesser gains nothing by spreading attempts over the processes.
 * One row per limiter and client key per window; expired rows are pruned by the store.
 */
export const rateLimitCounters = pgTable(
  'rate_limit_counters',
  {
    /** `<deployment scope>:<limiter>:<client key>` (the client key is an address or a user id). */
    key: text('key').primaryKey(),
    hits: integer('hits').notNull(),
    resetAt: timestamp('reset_at', { withTimezone: true }).notNull(),
  },
  (t) => [index('rate_limit_counters_reset_at_idx').on(t.resetAt)],
);
