// Worksheets and revisions: validating documents, evaluating them, storing immutable revisions and
// building the answers (summaries with authors, verdicts and published markers).
import { RawJson } from '../http/raw-json';
import { and, asc, desc, eq, inArray, isNull, sql } from 'drizzle-orm';
import { canonicalJson, sha256Hex } from '@shared/engine/hash';
import type { EvaluationResult } from '@shared/engine/result';
import { parseWorksheet, WORKSHEET_FORMAT, WORKSHEET_FORMAT_VERSION, type Worksheet } from '@shared/format/worksheet';
import type { Revision, RevisionSummary, ReviewVerdict, WorksheetSummary } from '@shared/api/worksheets';
import { memberships, publishedLinks, reviews, revisions, teams, users, worksheets } from '../../schema/index';
import type { Database, Transaction } from '../db/client';
import { HttpError } from '../http/errors';
import { availableDatasets, loadDatasetInputs, unknownDataset } from '../datasets/store';
import type { Evaluated, Evaluator } from '../evaluation/evaluator';
import { EvaluationFailedError, EvaluationLimitError } from '../evaluation/pool';

type Db = Database | Transaction;

export interface PreparedDocument {
  document: Worksheet;
  /** Canonical JSON of the validated document (defaults filled in): what is stored and hashed. */
  content: string;
  contentHash: string;
}

/** Validates an untrusted document; field paths in the 400 start at the request's `field` (`document`). */
export function prepareDocument(raw: unknown, field = 'document'): PreparedDocument {
  const parsed = parseWorksheet(raw);
  if (!parsed.ok) {
    const details = parsed.issues.map((issue) => ({
      field: issue.field === '(document)' ? field : `${field}.${issue.field}`,
      message: issue.message,
    }));
    const fields = [...new Set(details.map((d) => d.field))].slice(0, 5).join(', ');
    throw new HttpError(400, 'validation', `The worksheet document is not valid. Check these fields: ${fields}.`, details);
  }
  let content: string;
  try {
    content = canonicalJson(parsed.worksheet);
  } catch (error) {
    throw new HttpError(400, 'validation', `The worksheet document is not valid: ${(error as Error).message}.`, [
      { field, message: (error as Error).message },
    ]);
  }
  return { document: parsed.worksheet, content, contentHash: sha256Hex(content) };
}

export function blankDocument(title = 'Untitled worksheet'): Worksheet {
  return { format: WORKSHEET_FORMAT, version: WORKSHEET_FORMAT_VERSION, title, steps: [] };
}

/** Ids of the uploaded datasets a document's data steps use, with the step index of each use. */
export function datasetReferences(document: Worksheet): { id: string; stepIndex: number }[] {
  const refs: { id: string; stepIndex: number }[] = [];
  document.steps.forEach((step, stepIndex) => {
    if (step.kind === 'data' && step.params.origin === 'dataset') refs.push({ id: step.params.datasetId, stepIndex });
  });
  return refs;
}

export const datasetIdsOf = (document: Worksheet) => [...new Set(datasetReferences(document).map((r) => r.id))];

/** Every dataset the document uses must belong to the team (checked before any cache lookup). */
export async function assertDatasetsAvailable(db: Db, teamId: string, document: Worksheet, field = 'document'): Promise<void> {
  const refs = datasetReferences(document);
  if (refs.length === 0) return;
  const available = await availableDatasets(db, teamId, [...new Set(refs.map((r) => r.id))]);
  const problems = refs
    .filter((r) => !available.has(r.id))
    .map((r) => ({
      field: `${field}.steps.${r.stepIndex}.params.datasetId`,
      message: `Step ${r.stepIndex + 1} ("${document.steps[r.stepIndex].id}") uses dataset ${r.id.slice(0, 12)}…, which this team has not uploaded.`,
    }));
  if (problems.length > 0) throw unknownDataset(problems);
}

/** Evaluates through the pool and cache; limits and refusals become 422 answers. */
export async function evaluatePrepared(db: Db, evaluator: Evaluator, teamId: string, prepared: PreparedDocument, options: { useCache?: boolean } = {}): Promise<Evaluated> {
  await assertDatasetsAvailable(db, teamId, prepared.document);
  try {
    return await evaluator.evaluate(prepared.document, prepared.contentHash, () => loadDatasetInputs(db, datasetIdsOf(prepared.document)), options);
  } catch (error) {
    if (error instanceof EvaluationLimitError) {
      throw new HttpError(error.code === 'evaluation_busy' ? 503 : 422, error.code, error.message);
    }
    if (error instanceof EvaluationFailedError) {
      throw new HttpError(422, 'evaluation_failed', `The worksheet could not be evaluated: ${error.message}`, error.details);
    }
    throw error;
  }
}

export interface NewRevision {
  worksheetId: string;
  number: number;
  parentId: string | null;
  authorId: string;
  message: string;
  prepared: PreparedDocument;
  evaluated: Evaluated;
}

export async function insertRevision(tx: Transaction, input: NewRevision): Promise<string> {
  const [row] = await tx
    .insert(revisions)
    .values({
      worksheetId: input.worksheetId,
      number: input.number,
      parentId: input.parentId,
      authorId: input.authorId,
      message: input.message,
      content: input.prepared.content,
      contentHash: input.prepared.contentHash,
      engineVersion: input.evaluated.engineVersion,
      results: input.evaluated.resultsJson,
      resultsHash: input.evaluated.resultsHash,
    })
    .returning({ id: revisions.id, createdAt: revisions.createdAt });
  await tx
    .update(worksheets)
    .set({ headRevisionId: row.id, title: input.prepared.document.title, updatedAt: row.createdAt })
    .where(eq(worksheets.id, input.worksheetId));
  return row.id;
}

/** A new worksheet with its first revision, in the caller's transaction. */
export async function createWorksheet(
  tx: Transaction,
  input: { teamId: string; userId: string; prepared: PreparedDocument; evaluated: Evaluated; message: string; originRevisionId?: string | null },
): Promise<{ worksheetId: string; revisionId: string }> {
  const [ws] = await tx
    .insert(worksheets)
    .values({
      teamId: input.teamId,
      title: input.prepared.document.title,
      createdBy: input.userId,
      originRevisionId: input.originRevisionId ?? null,
    })
    .returning({ id: worksheets.id });
  const revisionId = await insertRevision(tx, {
    worksheetId: ws.id,
    number: 1,
    parentId: null,
    authorId: input.userId,
    message: input.message,
    prepared: input.prepared,
    evaluated: input.evaluated,
  });
  return { worksheetId: ws.id, revisionId };
}

// ---------------------------------------------------------------------------------------------
// Answers
// ---------------------------------------------------------------------------------------------

const iso = (d: Date) => d.toISOString();

function verdictAnswer(row: {
  id: string;
  revisionId: string;
  reviewerId: string;
  reviewerName: string;
  verdict: 'approved' | 'changes_requested';
  comment: string;
  contentHash: string;
  createdAt: Date;
}): ReviewVerdict {
  return {
    id: row.id,
    revisionId: row.revisionId,
    reviewer: { id: row.reviewerId, name: row.reviewerName },
    verdict: row.verdict,
    comment: row.comment,
    contentHash: row.contentHash,
    createdAt: iso(row.createdAt),
  };
}

export async function verdictsOf(db: Db, revisionIds: string[]): Promise<Map<string, ReviewVerdict[]>> {
  const out = new Map<string, ReviewVerdict[]>();
  if (revisionIds.length === 0) return out;
  const rows = await db
    .select({
      id: reviews.id,
      revisionId: reviews.revisionId,
      reviewerId: reviews.reviewerId,
      reviewerName: users.name,
      verdict: reviews.verdict,
      comment: reviews.comment,
      contentHash: reviews.contentHash,
      createdAt: reviews.createdAt,
    })
    .from(reviews)
    .innerJoin(users, eq(users.id, reviews.reviewerId))
    .where(inArray(reviews.revisionId, revisionIds))
    .orderBy(asc(reviews.createdAt), asc(reviews.id));
  for (const row of rows) {
    const list = out.get(row.revisionId) ?? [];
    list.push(verdictAnswer(row));
    out.set(row.revisionId, list);
  }
  return out;
}

async function publishedRevisions(db: Db, revisionIds: string[]): Promise<Set<string>> {
  if (revisionIds.length === 0) return new Set();
  const rows = await db
    .selectDistinct({ revisionId: publishedLinks.revisionId })
    .from(publishedLinks)
    .where(and(inArray(publishedLinks.revisionId, revisionIds), isNull(publishedLinks.revokedAt)));
  return new Set(rows.map((r) => r.revisionId));
}

const summaryColumns = {
  id: revisions.id,
  worksheetId: revisions.worksheetId,
  number: revisions.number,
  parentId: revisions.parentId,
  authorId: revisions.authorId,
  authorName: users.name,
  message: revisions.message,
  createdAt: revisions.createdAt,
  contentHash: revisions.contentHash,
  resultsHash: revisions.resultsHash,
  engineVersion: revisions.engineVersion,
};

type SummaryRow = {
  id: string;
  worksheetId: string;
  number: number;
  parentId: string | null;
  authorId: string;
  authorName: string;
  message: string;
  createdAt: Date;
  contentHash: string;
  resultsHash: string;
  engineVersion: string;
};

async function summariesFromRows(db: Db, rows: SummaryRow[]): Promise<RevisionSummary[]> {
  const ids = rows.map((r) => r.id);
  const [verdicts, published] = await Promise.all([verdictsOf(db, ids), publishedRevisions(db, ids)]);
  return rows.map((r) => ({
    id: r.id,
    worksheetId: r.worksheetId,
    number: r.number,
    parentId: r.parentId,
    author: { id: r.authorId, name: r.authorName },
    message: r.message,
    createdAt: iso(r.createdAt),
    contentHash: r.contentHash,
    resultsHash: r.resultsHash,
    engineVersion: r.engineVersion,
    reviews: verdicts.get(r.id) ?? [],
    published: published.has(r.id),
  }));
}

export async function revisionSummaries(db: Db, revisionIds: string[]): Promise<Map<string, RevisionSummary>> {
  if (revisionIds.length === 0) return new Map();
  const rows = await db
    .select(summaryColumns)
    .from(revisions)
    .innerJoin(users, eq(users.id, revisions.authorId))
    .where(inArray(revisions.id, revisionIds));
  const list = await summariesFromRows(db, rows);
  return new Map(list.map((s) => [s.id, s]));
}

/** One page of a worksheet's revisions, newest first. */
export async function timeline(db: Db, worksheetId: string, page: number, pageSize: number): Promise<{ items: RevisionSummary[]; total: number }> {
  const rows = await db
    .select(summaryColumns)
    .from(revisions)
    .innerJoin(users, eq(users.id, revisions.authorId))
    .where(eq(revisions.worksheetId, worksheetId))
    .orderBy(desc(revisions.number))
    .limit(pageSize)
    .offset((page - 1) * pageSize);
  const [{ total }] = await db
    .select({ total: sql<number>`count(*)::int` })
    .from(revisions)
    .where(eq(revisions.worksheetId, worksheetId));
  return { items: await summariesFromRows(db, rows), total };
}

/**
 * One revision in full for an answer: its summary, and the stored document and results as RawJson
 * (sent as they are stored by server/http/raw-json.ts sendJson, not parsed and serialised again;
 * the client receives the Revision shape of shared/api).
 */
export type RevisionAnswer = Omit<Revision, 'document' | 'results'> & { document: RawJson; results: RawJson };

export async function revisionAnswer(db: Db, revisionId: string): Promise<RevisionAnswer | null> {
  const [row] = await db
    .select({ ...summaryColumns, content: revisions.content, results: revisions.results })
    .from(revisions)
    .innerJoin(users, eq(users.id, revisions.authorId))
    .where(eq(revisions.id, revisionId));
  if (!row) return null;
  const [summary] = await summariesFromRows(db, [row]);
  return { ...summary, document: new RawJson(row.content), results: new RawJson(row.results) };
}

/** Summaries of worksheets for `userId` (origin titles only from teams the user belongs to). */
export async function worksheetSummaries(db: Db, userId: string, worksheetIds: string[]): Promise<WorksheetSummary[]> {
  if (worksheetIds.length === 0) return [];
  const creators = users;
  const rows = await db
    .select({
      id: worksheets.id,
      teamId: worksheets.teamId,
      teamName: teams.name,
      title: worksheets.title,
      archivedAt: worksheets.archivedAt,
      createdAt: worksheets.createdAt,
      updatedAt: worksheets.updatedAt,
      createdById: creators.id,
      createdByName: creators.name,
      headRevisionId: worksheets.headRevisionId,
      originRevisionId: worksheets.originRevisionId,
    })
    .from(worksheets)
    .innerJoin(teams, eq(teams.id, worksheets.teamId))
    .innerJoin(creators, eq(creators.id, worksheets.createdBy))
    .where(inArray(worksheets.id, worksheetIds));

  const headIds = rows.map((r) => r.headRevisionId).filter((id): id is string => id !== null);
  const originIds = rows.map((r) => r.originRevisionId).filter((id): id is string => id !== null);
  const [heads, origins, published] = await Promise.all([
    revisionSummaries(db, headIds),
    originIds.length === 0
      ? Promise.resolve([])
      : db
          .select({
            revisionId: revisions.id,
            number: revisions.number,
            worksheetId: worksheets.id,
            title: worksheets.title,
            member: sql<boolean>`exists (select 1 from ${memberships} where ${memberships.teamId} = ${worksheets.teamId} and ${memberships.userId} = ${userId})`,
          })
          .from(revisions)
          .innerJoin(worksheets, eq(worksheets.id, revisions.worksheetId))
          .where(inArray(revisions.id, originIds)),
    db
      .selectDistinct({ worksheetId: revisions.worksheetId })
      .from(publishedLinks)
      .innerJoin(revisions, eq(revisions.id, publishedLinks.revisionId))
      .where(and(inArray(revisions.worksheetId, worksheetIds), isNull(publishedLinks.revokedAt))),
  ]);
  const originById = new Map(origins.map((o) => [o.revisionId, o]));
  const publishedSet = new Set(published.map((p) => p.worksheetId));
  const byId = new Map(rows.map((r) => [r.id, r]));

  const out: WorksheetSummary[] = [];
  for (const id of worksheetIds) {
    const r = byId.get(id);
    if (!r || !r.headRevisionId) continue;
    const head = heads.get(r.headRevisionId);
    if (!head) continue;
    const origin = r.originRevisionId ? originById.get(r.originRevisionId) : undefined;
    out.push({
      id: r.id,
      teamId: r.teamId,
      teamName: r.teamName,
      title: r.title,
      archived: r.archivedAt !== null,
      createdAt: iso(r.createdAt),
      updatedAt: iso(r.updatedAt),
      createdBy: { id: r.createdById, name: r.createdByName },
      revisionCount: head.number,
      head,
      origin: origin
        ? { revisionId: origin.revisionId, revisionNumber: origin.number, worksheetId: origin.worksheetId, worksheetTitle: origin.member ? origin.title : null }
        : null,
      review: head.reviews.length > 0 ? head.reviews[head.reviews.length - 1] : null,
      published: publishedSet.has(r.id),
    });
  }
  return out;
}

export async function worksheetSummary(db: Db, userId: string, worksheetId: string): Promise<WorksheetSummary> {
  const [summary] = await worksheetSummaries(db, userId, [worksheetId]);
  if (!summary) throw new HttpError(404, 'not_found', 'Nothing was found at this address.');
  return summary;
}

/** The worksheet with its head revision in full (send it with sendJson: the head carries RawJson). */
export async function worksheetWithHead(db: Db, userId: string, worksheetId: string) {
  const worksheet = await worksheetSummary(db, userId, worksheetId);
  const head = await revisionAnswer(db, worksheet.head.id);
  if (!head) throw new HttpError(404, 'not_found', 'Nothing was found at this address.');
  return { worksheet, head };
}
