import { index, json, pgTable, timestamp, varchar } from 'drizzle-orm/pg-core';

/**
 * The table connect-pg-simple reads and writes (its own table.sql, expressed here so that it is
 * created by a committed migration rather than at run time). Names are the store's, not ours.
 */
export const sessions = pgTable(
  'session',
  {
    sid: varchar('sid').primaryKey(),
    sess: json('sess').notNull(),
    expire: timestamp('expire', { precision: 6 }).notNull(),
  },
  (table) => [index('IDX_session_expire').on(table.expire)],
);
