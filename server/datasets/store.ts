// Content-addressed dataset storage: one `datasets` row per distinct file (id = SHA-256 of the
// bytes), and one `team_datasets` row per team allowed to use it. A thousand revisions that use one
// upload refer to it by id and store it once.
import { and, eq, inArray, sql } from 'drizzle-orm';
import type { Dataset, SkippedRow } from '@shared/api/worksheets';
import { datasets, teamDatasets, users } from '../../schema/index';
import type { Database, Transaction } from '../db/client';
import { HttpError } from '../http/errors';
import type { DatasetInput } from '../evaluation/evaluator';

/** What parsing found, stored once with the bytes (`datasets.parsed`). */
export interface ParsedInfo {
  rowCount: number;
  delimiter: string | null;
  decimalComma: boolean;
  hasHeader: boolean;
  columns: { name: string; type: 'number' | 'text'; missing: number }[];
  skipped: SkippedRow[];
  skippedCount: number;
  /** XLSX: the sheet that was read. */
  sheet?: string;
}

type Db = Database | Transaction;

/**
 * Stores `bytes` under its hash unless already there and lets `teamId` use it. Returns whether the
 * bytes were already stored (for anyone). Safe under concurrent uploads of the same file.
 */
export async function storeDataset(
  db: Db,
  input: { id: string; bytes: Uint8Array; mediaType: string; parsed: ParsedInfo; name: string; teamId: string; userId: string },
): Promise<{ deduplicated: boolean }> {
  const inserted = await db
    .insert(datasets)
    .values({
      id: input.id,
      mediaType: input.mediaType,
      byteSize: input.bytes.byteLength,
      bytes: Buffer.from(input.bytes.buffer, input.bytes.byteOffset, input.bytes.byteLength),
      parsed: input.parsed,
    })
    .onConflictDoNothing()
    .returning({ id: datasets.id });
  await db
    .insert(teamDatasets)
    .values({ teamId: input.teamId, datasetId: input.id, name: input.name, uploadedBy: input.userId })
    .onConflictDoNothing();
  return { deduplicated: inserted.length === 0 };
}

/** Lets `teamId` use datasets another team already had (a fork into another team carries its data along). */
export async function shareDatasets(db: Db, ids: string[], fromTeamId: string, toTeamId: string, userId: string): Promise<void> {
  if (ids.length === 0 || fromTeamId === toTeamId) return;
  const rows = await db
    .select({ datasetId: teamDatasets.datasetId, name: teamDatasets.name })
    .from(teamDatasets)
    .where(and(eq(teamDatasets.teamId, fromTeamId), inArray(teamDatasets.datasetId, ids)));
  if (rows.length === 0) return;
  await db
    .insert(teamDatasets)
    .values(rows.map((r) => ({ teamId: toTeamId, datasetId: r.datasetId, name: r.name, uploadedBy: userId })))
    .onConflictDoNothing();
}

/** The ids among `ids` that `teamId` may use. */
export async function availableDatasets(db: Db, teamId: string, ids: string[]): Promise<Set<string>> {
  if (ids.length === 0) return new Set();
  const rows = await db
    .select({ id: teamDatasets.datasetId })
    .from(teamDatasets)
    .where(and(eq(teamDatasets.teamId, teamId), inArray(teamDatasets.datasetId, ids)));
  return new Set(rows.map((r) => r.id));
}

export async function loadDatasetInputs(db: Db, ids: string[]): Promise<Record<string, DatasetInput>> {
  if (ids.length === 0) return {};
  const rows = await db
    .select({ id: datasets.id, bytes: datasets.bytes, mediaType: datasets.mediaType })
    .from(datasets)
    .where(inArray(datasets.id, ids));
  const out: Record<string, DatasetInput> = {};
  for (const row of rows) {
    out[row.id] = { bytes: new Uint8Array(row.bytes.buffer, row.bytes.byteOffset, row.bytes.byteLength), mediaType: row.mediaType };
  }
  return out;
}

export async function loadDatasetFiles(
  db: Db,
  teamId: string,
  ids: string[],
): Promise<{ id: string; name: string; mediaType: string; bytes: Buffer }[]> {
  if (ids.length === 0) return [];
  return db
    .select({ id: datasets.id, name: teamDatasets.name, mediaType: datasets.mediaType, bytes: datasets.bytes })
    .from(teamDatasets)
    .innerJoin(datasets, eq(datasets.id, teamDatasets.datasetId))
    .where(and(eq(teamDatasets.teamId, teamId), inArray(teamDatasets.datasetId, ids)))
    .orderBy(datasets.id);
}

const datasetColumns = {
  id: datasets.id,
  name: teamDatasets.name,
  mediaType: datasets.mediaType,
  byteSize: datasets.byteSize,
  parsed: datasets.parsed,
  createdAt: teamDatasets.createdAt,
  uploaderId: users.id,
  uploaderName: users.name,
};

type DatasetRowView = {
  id: string;
  name: string;
  mediaType: string;
  byteSize: number;
  parsed: unknown;
  createdAt: Date;
  uploaderId: string;
  uploaderName: string;
};

export function datasetAnswer(row: DatasetRowView, options: { withSkipped?: boolean } = {}): Dataset {
  const parsed = row.parsed as ParsedInfo;
  return {
    id: row.id,
    name: row.name,
    mediaType: row.mediaType,
    byteSize: row.byteSize,
    rowCount: parsed.rowCount,
    delimiter: parsed.delimiter,
    decimalComma: parsed.decimalComma,
    hasHeader: parsed.hasHeader,
    columns: parsed.columns,
    skipped: options.withSkipped === false ? [] : parsed.skipped,
    skippedCount: parsed.skippedCount,
    createdAt: row.createdAt.toISOString(),
    uploadedBy: { id: row.uploaderId, name: row.uploaderName },
  };
}

export async function findTeamDataset(db: Db, teamId: string, id: string): Promise<Dataset | null> {
  const [row] = await db
    .select(datasetColumns)
    .from(teamDatasets)
    .innerJoin(datasets, eq(datasets.id, teamDatasets.datasetId))
    .innerJoin(users, eq(users.id, teamDatasets.uploadedBy))
    .where(and(eq(teamDatasets.teamId, teamId), eq(teamDatasets.datasetId, id)));
  return row ? datasetAnswer(row) : null;
}

export async function listTeamDatasets(db: Db, teamId: string, page: number, pageSize: number): Promise<{ items: Dataset[]; total: number }> {
  const rows = await db
    .select(datasetColumns)
    .from(teamDatasets)
    .innerJoin(datasets, eq(datasets.id, teamDatasets.datasetId))
    .innerJoin(users, eq(users.id, teamDatasets.uploadedBy))
    .where(eq(teamDatasets.teamId, teamId))
    .orderBy(sql`${teamDatasets.createdAt} desc`, datasets.id)
    .limit(pageSize)
    .offset((page - 1) * pageSize);
  const [{ total }] = await db
    .select({ total: sql<number>`count(*)::int` })
    .from(teamDatasets)
    .where(eq(teamDatasets.teamId, teamId));
  return { items: rows.map((r) => datasetAnswer(r, { withSkipped: false })), total };
}

export const unknownDataset = (problems: { field: string; message: string }[]) =>
  new HttpError(
    422,
    'unknown_dataset',
    problems.length === 1 ? problems[0].message : `${problems.length} data steps refer to datasets this team does not have.`,
    problems,
  );
