import { pgTable, text, timestamp, uuid } from 'drizzle-orm/pg-core';

export const users = pgTable('users', {
  id: uuid('id').primaryKey().defaultRandom(),
  name: text('name').notNull(),
  /** Stored trimmed and lower-cased, so the unique constraint is case-insensitive in effect. */
  email: text('email').notNull().unique('users_email_unique'),
  /** `scrypt$N$r$p$salt$hash`, see server/auth/password.ts. Never leaves the server. */
  passwordHash: text('password_hash').notNull(),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
});

export type UserRow = typeof users.$inferSelect;
