// Worksheets and everything hanging off them: immutable revisions, content-addressed datasets,
// published links, reviews and the audit trail.
//
// Immutability of revisions, reviews and audit events is enforced in the database (a trigger
// rejects UPDATE and DELETE; see the custom migration named immutable_records), so it holds whatever code talks to
// the database. The worksheet row is the only mutable pointer: its head, title and archive state.
import { sql } from 'drizzle-orm';
import {
  type AnyPgColumn,
  bigint,
  bigserial,
  customType,
  index,
  integer,
  jsonb,
  pgEnum,
  pgTable,
  primaryKey,
  text,
  timestamp,
  unique,
  uuid,
} from 'drizzle-orm/pg-core';
import { teams } from './teams';
import { users } from './users';

const bytea = customType<{ data: Buffer; driverData: Buffer }>({
  dataType: () => 'bytea',
});

const createdAt = () => timestamp('created_at', { withTimezone: true }).notNull().defaultNow();

export const worksheets = pgTable(
  'worksheets',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    teamId: uuid('team_id')
      .notNull()
      .references(() => teams.id),
    /** Title of the head revision's document, kept here for search and listing. */
    title: text('title').notNull(),
    /** Null only inside the transaction that creates the worksheet and its first revision. */
    headRevisionId: uuid('head_revision_id').references((): AnyPgColumn => revisions.id),
    /** For forks: the revision (of any worksheet) this one was forked from. */
    originRevisionId: uuid('origin_revision_id').references((): AnyPgColumn => revisions.id),
    createdBy: uuid('created_by')
      .notNull()
      .references(() => users.id),
    createdAt: createdAt(),
    /** Time of the head revision. */
    updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow(),
    archivedAt: timestamp('archived_at', { withTimezone: true }),
  },
  (t) => [index('worksheets_team_id_idx').on(t.teamId), index('worksheets_origin_revision_id_idx').on(t.originRevisionId)],
);

export const revisions = pgTable(
  'revisions',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    worksheetId: uuid('worksheet_id')
      .notNull()
      .references(() => worksheets.id),
    /** 1, 2, 3 … in save order within the worksheet. */
    number: integer('number').notNull(),
    parentId: uuid('parent_id').references((): AnyPgColumn => revisions.id),
    authorId: uuid('author_id')
      .notNull()
      .references(() => users.id),
    message: text('message').notNull().default(''),
    createdAt: createdAt(),
    /** Canonical JSON of the validated document; contentHash is the SHA-256 of exactly this text. */
    content: text('content').notNull(),
    contentHash: text('content_hash').notNull(),
    engineVersion: text('engine_version').notNull(),
    /** Canonical JSON of the evaluation results; resultsHash is the SHA-256 of exactly this text. */
    results: text('results').notNull(),
    resultsHash: text('results_hash').notNull(),
  },
  (t) => [
    unique('revisions_worksheet_number_unique').on(t.worksheetId, t.number),
    index('revisions_content_hash_idx').on(t.contentHash, t.engineVersion),
  ],
);

/** One row per distinct file, whoever uploaded it and however many revisions use it. */
export const datasets = pgTable('datasets', {
  /** SHA-256 (hex) of the bytes. */
  id: text('id').primaryKey(),
  mediaType: text('media_type').notNull(),
  byteSize: bigint('byte_size', { mode: 'number' }).notNull(),
  bytes: bytea('bytes').notNull(),
  /** What parsing found, stored once: columns (name, type, missing), row count, delimiter, skipped rows. */
  parsed: jsonb('parsed').notNull(),
  createdAt: createdAt(),
});

/** Which teams may use a dataset (a dataset is visible only to teams that uploaded or received it). */
export const teamDatasets = pgTable(
  'team_datasets',
  {
    teamId: uuid('team_id')
      .notNull()
      .references(() => teams.id),
    datasetId: text('dataset_id')
      .notNull()
      .references(() => datasets.id),
    /** File name as first uploaded by this team. */
    name: text('name').notNull(),
    uploadedBy: uuid('uploaded_by')
      .notNull()
      .references(() => users.id),
    createdAt: createdAt(),
  },
  (t) => [primaryKey({ columns: [t.teamId, t.datasetId] })],
);

export const publishedLinks = pgTable(
  'published_links',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    revisionId: uuid('revision_id')
      .notNull()
      .references(() => revisions.id),
    /** SHA-256 (hex) of the token; the token itself is shown once and never stored. */
    tokenHash: text('token_hash').notNull().unique('published_links_token_hash_unique'),
    createdBy: uuid('created_by')
      .notNull()
      .references(() => users.id),
    createdAt: createdAt(),
    revokedAt: timestamp('revoked_at', { withTimezone: true }),
    revokedBy: uuid('revoked_by').references(() => users.id),
  },
  (t) => [index('published_links_revision_id_idx').on(t.revisionId)],
);

export const reviewVerdict = pgEnum('review_verdict', ['approved', 'changes_requested']);

export const reviews = pgTable(
  'reviews',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    revisionId: uuid('revision_id')
      .notNull()
      .references(() => revisions.id),
    reviewerId: uuid('reviewer_id')
      .notNull()
      .references(() => users.id),
    verdict: reviewVerdict('verdict').notNull(),
    comment: text('comment').notNull().default(''),
    /** The content hash of the revision the verdict is about (copied, so the row speaks for itself). */
    contentHash: text('content_hash').notNull(),
    createdAt: createdAt(),
  },
  (t) => [index('reviews_revision_id_idx').on(t.revisionId)],
);

export const reviewRequests = pgTable(
  'review_requests',
  {
    id: uuid('id').primaryKey().defaultRandom(),
    revisionId: uuid('revision_id')
      .notNull()
      .references(() => revisions.id),
    requestedBy: uuid('requested_by')
      .notNull()
      .references(() => users.id),
    reviewerId: uuid('reviewer_id')
      .notNull()
      .references(() => users.id),
    message: text('message').notNull().default(''),
    createdAt: createdAt(),
  },
  (t) => [index('review_requests_reviewer_id_idx').on(t.reviewerId), index('review_requests_revision_id_idx').on(t.revisionId)],
);

export const auditEvents = pgTable(
  'audit_events',
  {
    id: bigserial('id', { mode: 'number' }).primaryKey(),
    teamId: uuid('team_id').references(() => teams.id),
    /** Null for actions without a signed-in user (none yet; kept for system actions). */
    actorId: uuid('actor_id').references(() => users.id),
    action: text('action').notNull(),
    objectType: text('object_type').notNull(),
    objectId: text('object_id').notNull(),
    worksheetId: uuid('worksheet_id').references(() => worksheets.id),
    details: jsonb('details').notNull().default(sql`'{}'::jsonb`),
    createdAt: createdAt(),
  },
  (t) => [index('audit_events_team_id_created_at_idx').on(t.teamId, t.createdAt)],
);

export type WorksheetRow = typeof worksheets.$inferSelect;
export type RevisionRow = typeof revisions.$inferSelect;
export type DatasetRow = typeof datasets.$inferSelect;
export type PublishedLinkRow = typeof publishedLinks.$inferSelect;
export type ReviewRow = typeof reviews.$inferSelect;
export type ReviewRequestRow = typeof reviewRequests.$inferSelect;
export type AuditEventRow = typeof auditEvents.$inferSelect;
