/**
 * Request bodies and answers of the worksheet service (worksheets, revisions, evaluation, datasets,
 * compare, publishing, reviews, audit), shared by the server (validation) and the client (types).
 * The HTTP routes are listed in the README's API section.
 */
import { z } from 'zod';
import type { EvaluationResult } from '../engine/result';
import type { CompareResult } from '../compare/compare';
import type { Worksheet } from '../format/worksheet';
import type { TeamRole } from './teams';

export type { CompareResult } from '../compare/compare';

const uuid = z.uuid({ error: 'Expected an id.' });
/** A revision's document as sent by the client; validated against the worksheet format by the server. */
const documentField = z.unknown().refine((v) => v !== undefined, { error: 'Send the worksheet document.' });

// ---------------------------------------------------------------------------------------------
// Requests
// ---------------------------------------------------------------------------------------------

export const listWorksheetsQuery = z.object({
  q: z.string().trim().max(200).optional(),
  teamId: uuid.optional(),
  archived: z.enum(['true', 'false']).default('false').transform((v) => v === 'true'),
  sort: z.enum(['updated', 'created', 'title']).default('updated'),
  order: z.enum(['asc', 'desc']).default('desc'),
  page: z.coerce.number().int().min(1).max(100_000).default(1),
  pageSize: z.coerce.number().int().min(1).max(100).default(20),
});
export type ListWorksheetsQuery = z.input<typeof listWorksheetsQuery>;

const title = z.string().trim().min(1, { error: 'Enter a title.' }).max(200, { error: 'A title has at most 200 characters.' });

export const createWorksheetRequest = z.discriminatedUnion(
  'source',
  [
    z.object({ source: z.literal('blank'), title: title.optional() }),
    z.object({ source: z.literal('example'), exampleId: z.string().min(1).max(100), title: title.optional() }),
  ],
  { error: 'Choose source "blank" or "example".' },
);
export type CreateWorksheetRequest = z.infer<typeof createWorksheetRequest>;

const message = z.string().max(500, { error: 'A message has at most 500 characters.' }).default('');

export const saveRevisionRequest = z.object({
  baseRevisionId: uuid,
  document: documentField,
  message,
});
export type SaveRevisionRequest = { baseRevisionId: string; document: unknown; message?: string };

export const evaluateDraftRequest = z.object({ document: documentField });
export type EvaluateDraftRequest = { document: unknown };

export const forkRequest = z.object({
  teamId: uuid,
  title: title.optional(),
  message,
  document: z.unknown().optional(),
});
export type ForkRequest = { teamId: string; title?: string; message?: string; document?: unknown };

export const pageQuery = z.object({
  page: z.coerce.number().int().min(1).max(100_000).default(1),
  pageSize: z.coerce.number().int().min(1).max(100).default(20),
});

export const timelineQuery = z.object({
  page: z.coerce.number().int().min(1).max(100_000).default(1),
  pageSize: z.coerce.number().int().min(1).max(100).default(100),
});

export const exportQuery = z.object({ revisionId: uuid.optional() });

export const compareQuery = z.object({ from: uuid, to: uuid });

export const datasetRowsQuery = z.object({
  offset: z.coerce.number().int().min(0).default(0),
  limit: z.coerce.number().int().min(1).max(500).default(50),
});

export const reviewRequestRequest = z.object({
  reviewerId: uuid,
  message: z.string().max(2000, { error: 'A message has at most 2000 characters.' }).default(''),
});
export type ReviewRequestRequest = z.input<typeof reviewRequestRequest>;

export const reviewVerdicts = ['approved', 'changes_requested'] as const;
export type ReviewVerdictKind = (typeof reviewVerdicts)[number];

export const verdictRequest = z
  .object({
    verdict: z.enum(reviewVerdicts, { error: 'Choose "approved" or "changes_requested".' }),
    comment: z.string().max(5000, { error: 'A comment has at most 5000 characters.' }).default(''),
    contentHash: z
      .string()
      .regex(/^[0-9a-f]{64}$/, { error: 'A content hash is 64 lower-case hex digits.' })
      .optional(),
  })
  .refine((v) => v.verdict !== 'changes_requested' || v.comment.trim() !== '', {
    error: 'Say which changes you are asking for.',
    path: ['comment'],
  });
export type VerdictRequest = z.input<typeof verdictRequest>;

export const inboxQuery = pageQuery.extend({ status: z.enum(['open', 'answered', 'all']).default('open') });

export const auditQuery = pageQuery.extend({
  action: z.string().max(100).optional(),
  objectType: z.string().max(100).optional(),
  pageSize: z.coerce.number().int().min(1).max(200).default(50),
});

// ---------------------------------------------------------------------------------------------
// Answers
// ---------------------------------------------------------------------------------------------

export interface UserRef {
  id: string;
  name: string;
}

export interface Page<T> {
  items: T[];
  total: number;
  page: number;
  pageSize: number;
}

export interface ReviewVerdict {
  id: string;
  revisionId: string;
  reviewer: UserRef;
  verdict: ReviewVerdictKind;
  comment: string;
  contentHash: string;
  createdAt: string;
}

export interface RevisionSummary {
  id: string;
  worksheetId: string;
  number: number;
  parentId: string | null;
  author: UserRef;
  message: string;
  createdAt: string;
  contentHash: string;
  resultsHash: string;
  engineVersion: string;
  reviews: ReviewVerdict[];
  published: boolean;
}

export interface Revision extends RevisionSummary {
  document: Worksheet;
  results: EvaluationResult;
}

export interface WorksheetOrigin {
  revisionId: string;
  revisionNumber: number;
  worksheetId: string;
  /** Null when the caller is not a member of the origin's team. */
  worksheetTitle: string | null;
}

export interface WorksheetSummary {
  id: string;
  teamId: string;
  teamName: string;
  title: string;
  archived: boolean;
  createdAt: string;
  updatedAt: string;
  createdBy: UserRef;
  revisionCount: number;
  head: RevisionSummary;
  origin: WorksheetOrigin | null;
  review: ReviewVerdict | null;
  published: boolean;
}

export interface WorksheetWithHead {
  worksheet: WorksheetSummary;
  head: Revision;
}

export interface WorksheetDetail extends WorksheetWithHead {
  myRole: TeamRole;
}

export interface ExampleSummary {
  id: string;
  title: string;
  description: string;
}

export interface TimelineAnswer extends Page<RevisionSummary> {
  forks: { worksheetId: string; title: string; teamId: string; originRevisionId: string }[];
}

export interface SaveRevisionAnswer {
  revision: Revision;
  worksheet: WorksheetSummary;
}

/** `details` of the 409 `head_moved` answer to a save. */
export interface HeadMovedDetails {
  baseRevisionId: string;
  head: RevisionSummary;
}

export interface EvaluationOutcome {
  results: EvaluationResult;
  contentHash: string;
  resultsHash: string;
  engineVersion: string;
  cached: boolean;
  elapsedMs: number;
}

export interface RevisionAnswer {
  revision: Revision;
  worksheet: WorksheetSummary;
  isHead: boolean;
}

export interface RecheckAnswer {
  revisionId: string;
  storedEngineVersion: string;
  currentEngineVersion: string;
  storedResultsHash: string;
  currentResultsHash: string;
  matches: boolean;
  /** What differs between the stored and the fresh results; null when they match. */
  changes: Pick<CompareResult, 'results' | 'conclusions'> | null;
}

export interface CompareAnswer {
  from: RevisionSummary;
  to: RevisionSummary;
  comparison: CompareResult;
}

/** The file `GET /api/worksheets/:id/export` returns and `POST …/import` accepts. */
export interface WorksheetExport {
  format: 'spreadproof-export';
  exportVersion: 1;
  contentHash: string;
  document: Worksheet;
  datasets: { id: string; name: string; mediaType: string; bytesBase64: string }[];
}

export interface DatasetColumnInfo {
  name: string;
  type: 'number' | 'text';
  missing: number;
}

export interface SkippedRow {
  line: number;
  column?: number;
  reason: string;
}

export interface Dataset {
  id: string;
  name: string;
  mediaType: string;
  byteSize: number;
  rowCount: number;
  delimiter: string | null;
  decimalComma: boolean;
  hasHeader: boolean;
  columns: DatasetColumnInfo[];
  /** The first 100 skipped rows or cells; `skippedCount` is the total. */
  skipped: SkippedRow[];
  skippedCount: number;
  createdAt: string;
  uploadedBy: UserRef;
}

export interface UploadAnswer {
  dataset: Dataset;
  deduplicated: boolean;
}

export interface DatasetRowsAnswer {
  dataset: Dataset;
  rows: { offset: number; limit: number; values: (number | string | null)[][] };
}

export interface Link {
  id: string;
  revisionId: string;
  revisionNumber: number;
  createdAt: string;
  createdBy: UserRef;
  revokedAt: string | null;
}

export interface PublishAnswer {
  link: Link;
  /** Shown once; only its hash is stored. */
  token: string;
  /** App-relative path of the published view, `/p/<token>`. */
  url: string;
}

export interface PublicRevisionAnswer {
  title: string;
  revision: {
    number: number;
    createdAt: string;
    contentHash: string;
    resultsHash: string;
    engineVersion: string;
    document: Worksheet;
    results: EvaluationResult;
  };
}

export interface ReviewRequest {
  id: string;
  revisionId: string;
  worksheetId: string;
  worksheetTitle: string;
  revisionNumber: number;
  requestedBy: UserRef;
  reviewer: UserRef;
  message: string;
  createdAt: string;
  status: 'open' | 'answered';
  verdictId: string | null;
}

export interface RevisionReviewsAnswer {
  reviews: ReviewVerdict[];
  requests: ReviewRequest[];
}

export interface AuditEvent {
  id: string;
  at: string;
  actor: UserRef | null;
  action: string;
  objectType: string;
  objectId: string;
  worksheetId: string | null;
  details: Record<string, unknown>;
}
