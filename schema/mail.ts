// Mail and account flows: the outbox that the background sender drains, team invitations,
// password-reset tokens, per-user notification settings, and the store of the local mail server
// used in development and tests.
//
// Tokens sent by mail (invitations, password resets) are stored only as their SHA-256; the link in
// the message is the only place the token itself exists. The outbox erases a message's bodies once
// it is sent or given up, so a link does not linger in the database either.
import { sql } from 'drizzle-orm';
import { boolean, check, index, integer, pgEnum, pgTable, text, timestamp, uniqueIndex, uuid } from 'drizzle-orm/pg-core';
import { teamRole, teams } from './teams';
import { users } from './users';

const createdAt = () => timestamp('created_at', { withTimezone: true }).notNull().defaultNow();

/** What a message is about; notification kinds can be switched off per user, the others cannot. */
export const mailKind = pgEnum('mail_kind', [
  'invitation',
  'password_reset',
  'review_requested',
  'review_verdict',
  'invitation_accepted',
]);

export const mailStatus = pgEnum('mail_status', ['pending', 'sent', 'failed']);

export const mailOutbox = pgTable(
  'mail_outbox',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    kind: mailKind('kind').notNull(),
    recipient: text('recipient').notNull(),
    /** The account the message is for, when it is for one (an invitation may be for a newcomer). */
    recipientUserId: uuid('recipient_user_id').references(() => users.id, { onDelete: 'set null' }),
    subject: text('subject').notNull(),
    /** Erased (null) once the message is sent or given up: it may carry a one-time link. */
    textBody: text('text_body'),
    htmlBody: text('html_body'),
    status: mailStatus('status').notNull().default('pending'),
    /** Delivery attempts started so far. */
    attempts: integer('attempts').notNull().default(0),
    /**
     * When the sender may pick the row up next. Claiming a row moves this forward by a lease, so a
     * sender that dies mid-delivery leaves the row to be retried once the lease has run out.
     */
    nextAttemptAt: timestamp('next_attempt_at', { withTimezone: true }).notNull().defaultNow(),
    lastError: text('last_error'),
    /** Message-ID the transport gave the message. */
    messageId: text('message_id'),
    /** Makes enqueueing the same notification twice a no-op (e.g. `review_verdict:<reviewId>:<userId>`). */
    dedupeKey: text('dedupe_key').unique('mail_outbox_dedupe_key_unique'),
    createdAt: createdAt(),
    sentAt: timestamp('sent_at', { withTimezone: true }),
  },
  (t) => [index('mail_outbox_due_idx').on(t.nextAttemptAt).where(sql`${t.status} = 'pending'`)],
);

export const invitations = pgTable(
  'invitations',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    teamId: uuid('team_id')
      .notNull()
      .references(() => teams.id, { onDelete: 'cascade' }),
    /** Trimmed and lower-cased, like users.email. */
    email: text('email').notNull(),
    role: teamRole('role').notNull(),
    tokenHash: text('token_hash').notNull().unique('invitations_token_hash_unique'),
    invitedBy: uuid('invited_by').references(() => users.id, { onDelete: 'set null' }),
    createdAt: createdAt(),
    expiresAt: timestamp('expires_at', { withTimezone: true }).notNull(),
    acceptedAt: timestamp('accepted_at', { withTimezone: true }),
    acceptedBy: uuid('accepted_by').references(() => users.id, { onDelete: 'set null' }),
    /** Withdrawn by an owner, or replaced by a newer invitation to the same address. */
    withdrawnAt: timestamp('withdrawn_at', { withTimezone: true }),
  },
  (t) => [
    // At most one open invitation per address and team: inviting again replaces the open one.
    uniqueIndex('invitations_open_unique')
      .on(t.teamId, t.email)
      .where(sql`${t.acceptedAt} is null and ${t.withdrawnAt} is null`),
    check('invitations_closed_once', sql`${t.acceptedAt} is null or ${t.withdrawnAt} is null`),
  ],
);

export const passwordResets = pgTable(
  'password_resets',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    userId: uuid('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    tokenHash: text('token_hash').notNull().unique('password_resets_token_hash_unique'),
    createdAt: createdAt(),
    expiresAt: timestamp('expires_at', { withTimezone: true }).notNull(),
    /** Set when the link was used, or when a newer link or a password change made it void. */
    usedAt: timestamp('used_at', { withTimezone: true }),
  },
  (t) => [index('password_resets_user_id_idx').on(t.userId)],
);

/** One row per user who changed a setting; no row means every notification is on. */
export const notificationSettings = pgTable('notification_settings', {
  userId: uuid('user_id')
    .primaryKey()
    .references(() => users.id, { onDelete: 'cascade' }),
  reviewRequested: boolean('review_requested').notNull().default(true),
  reviewVerdict: boolean('review_verdict').notNull().default(true),
  invitationAccepted: boolean('invitation_accepted').notNull().default(true),
  updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow(),
});

/**
 * Messages received by the local mail server (development and tests only): what a recipient's
 * mailbox would hold. `raw` is the message exactly as it arrived over SMTP.
 */
export const devMailbox = pgTable(
  'dev_mailbox',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    receivedAt: timestamp('received_at', { withTimezone: true }).notNull().defaultNow(),
    envelopeFrom: text('envelope_from').notNull(),
    envelopeTo: text('envelope_to').array().notNull(),
    fromHeader: text('from_header').notNull().default(''),
    toHeader: text('to_header').notNull().default(''),
    subject: text('subject').notNull().default(''),
    messageId: text('message_id'),
    text: text('text'),
    html: text('html'),
    raw: text('raw').notNull(),
  },
  (t) => [index('dev_mailbox_received_at_idx').on(t.receivedAt)],
);

export type MailOutboxRow = typeof mailOutbox.$inferSelect;
export type InvitationRow = typeof invitations.$inferSelect;
export type PasswordResetRow = typeof passwordResets.$inferSelect;
export type NotificationSettingsRow = typeof notificationSettings.$inferSelect;
export type DevMailboxRow = typeof devMailbox.$inferSelect;
