/**
 * Helpers of the reliability suites: an in-process app on a database of the suite's choosing, and
 * checks of stored revisions straight from the tables (hashes recomputed from the stored text).
 */
import { expect } from 'chai';
import pg from 'pg';
import { canonicalJson, sha256Hex } from '@shared/engine/hash';
import type { AppDeps } from '../../server/app';
import { openAppWithEvaluator, type ServiceHarness } from '../server/worksheets-support';

export type AppOn = ServiceHarness;

/** createApp() on the database at `url`, with an evaluator of its own (closed with the app). */
export function openAppOn(url: string, overrides: Partial<AppDeps> = {}): AppOn {
  return openAppWithEvaluator(url, { overrides, evaluatorOptions: { maxThreads: 1 }, poolSize: 5 });
}

export async function withClient<T>(url: string, body: (client: pg.Client) => Promise<T>): Promise<T> {
  const client = new pg.Client({ connectionString: url });
  await client.connect();
  try {
    return await body(client);
  } finally {
    await client.end();
  }
}

export interface StoredRevision {
  id: string;
  worksheetId: string;
  number: number;
  parentId: string | null;
  contentHash: string;
  resultsHash: string;
  /** SHA-256 of the stored content and results text, recomputed here. */
  contentHashRecomputed: string;
  resultsHashRecomputed: string;
}

/** Every revision row with its hashes recomputed from the stored text. */
export async function storedRevisions(url: string): Promise<StoredRevision[]> {
  return withClient(url, async (client) => {
    const { rows } = await client.query(
      'select id, worksheet_id, number, parent_id, content, content_hash, results, results_hash from revisions order by worksheet_id, number',
    );
    return rows.map((r) => ({
      id: r.id,
      worksheetId: r.worksheet_id,
      number: r.number,
      parentId: r.parent_id,
      contentHash: r.content_hash,
      resultsHash: r.results_hash,
      contentHashRecomputed: sha256Hex(r.content),
      resultsHashRecomputed: sha256Hex(r.results),
    }));
  });
}

/**
 * What "no partial rows" means for the worksheet tables, checked in SQL: every worksheet has a
 * head; the head is its highest-numbered revision; numbers run 1..n without gaps; every revision
 * after the first names a parent of the same worksheet; every save has its audit event; every
 * stored hash is the SHA-256 of the stored text.
 */
export async function expectConsistentStore(url: string): Promise<{ worksheets: number; revisions: number }> {
  const revisions = await storedRevisions(url);
  for (const r of revisions) {
    expect(r.contentHashRecomputed, `content hash of revision ${r.id}`).to.equal(r.contentHash);
    expect(r.resultsHashRecomputed, `results hash of revision ${r.id}`).to.equal(r.resultsHash);
  }
  return withClient(url, async (client) => {
    const headless = await client.query('select id from worksheets where head_revision_id is null');
    expect(headless.rows, 'worksheets without a head revision').to.deep.equal([]);
    const wrongHead = await client.query(`
      select w.id from worksheets w join revisions h on h.id = w.head_revision_id
      where h.worksheet_id <> w.id or h.number <> (select max(number) from revisions r where r.worksheet_id = w.id)`);
    expect(wrongHead.rows, 'worksheets whose head is not their newest revision').to.deep.equal([]);
    const gaps = await client.query(`
      select worksheet_id from revisions group by worksheet_id having max(number) <> count(*) or min(number) <> 1`);
    expect(gaps.rows, 'worksheets with gaps in their revision numbers').to.deep.equal([]);
    const orphans = await client.query(`
      select r.id from revisions r left join revisions p on p.id = r.parent_id
      where r.number > 1 and (p.id is null or p.worksheet_id <> r.worksheet_id)`);
    // Forks start at number 1 without a parent; later revisions must name one in the same worksheet.
    expect(orphans.rows, 'revisions after the first without a parent in the same worksheet').to.deep.equal([]);
    const unaudited = await client.query(`
      select r.id from revisions r where r.number > 1 and not exists (
        select 1 from audit_events a where a.action = 'revision.save' and a.object_id = r.id::text)`);
    expect(unaudited.rows, 'saved revisions without their audit event').to.deep.equal([]);
    const { rows } = await client.query<{ n: number }>('select count(*)::int as n from worksheets');
    return { worksheets: rows[0].n, revisions: revisions.length };
  });
}

/** The hash pair a client can check from an API answer: recomputed from the document and results it received. */
export function hashesOfAnswer(revision: { document: unknown; results: unknown }): { contentHash: string; resultsHash: string } {
  return { contentHash: sha256Hex(canonicalJson(revision.document)), resultsHash: sha256Hex(canonicalJson(revision.results)) };
}

export const sleep = (ms: number) => new Promise((resolve) => setTimeout(resolve, ms));

/** Retries `probe` until it returns true or `timeoutMs` passes; returns the attempts it took. */
export async function eventually(probe: () => Promise<boolean>, timeoutMs: number, what: string, stepMs = 200): Promise<number> {
  const started = Date.now();
  let attempts = 0;
  let last: unknown;
  while (Date.now() - started < timeoutMs) {
    attempts += 1;
    try {
      if (await probe()) return attempts;
    } catch (error) {
      last = error;
    }
    await sleep(stepMs);
  }
  throw new Error(`${what} did not happen within ${timeoutMs} ms${last ? ` (last error: ${(last as Error).message})` : ''}`);
}
