// The worker module of the evaluation pool: evaluates worksheets with the engine and reads
// uploaded files. Runs in a worker thread; everything it returns is plain data.
import '../native-hash';
import { canonicalJson, sha256Hex } from '@shared/engine/hash';
import { ENGINE_VERSION } from '@shared/engine/version';
import { evaluate } from '@shared/engine/evaluate';
import { parsedInfo, readTable, UploadProblem } from '../datasets/parse';
import type { EvaluationReply, ParseReply, PoolTask, TableReply } from './evaluator';
import { SizedLru } from './lru';
import { defineWorker } from './worker-support';
import type { Table } from '@shared/engine/table/parse';

/**
 * Parsed datasets by id, per worker: live previews re-evaluate the same large upload on every
 * edit, and parsing 50 MB each time would dominate. Ids are content hashes, so entries never go stale.
 */
const parsedTables = new SizedLru<string, Table>(128 * 1024 * 1024, (t) =>
  t.columns.reduce((n, c) => n + (c.type === 'number' ? c.values.byteLength : c.values.length * 24), 1000),
);

/** Refusals that come back as a reply (a 4xx), as opposed to defects (a 500). */
const isRefusal = (error: unknown) => error instanceof UploadProblem || (error as { name?: string })?.name === 'WorksheetError';

export default defineWorker(async (task: PoolTask): Promise<EvaluationReply | ParseReply | TableReply> => {
  if (task.kind === 'parse') {
    try {
      const { table, sheet } = await readTable(task.bytes, task.mediaType);
      return { info: parsedInfo(table, sheet) };
    } catch (error) {
      if (error instanceof UploadProblem) {
        throw Object.assign(error, { details: { status: error.status, code: error.code, line: error.line, column: error.column } });
      }
      throw error;
    }
  }
  if (task.kind === 'table') {
    return { table: (await readTable(task.bytes, task.mediaType)).table };
  }
  const start = performance.now();
  const tables: Record<string, Table> = {};
  for (const [id, input] of Object.entries(task.datasets)) {
    let table = parsedTables.get(id);
    if (!table) {
      table = (await readTable(input.bytes, input.mediaType)).table;
      parsedTables.set(id, table);
    }
    tables[id] = table;
  }
  const results = evaluate(task.document, tables);
  const resultsJson = canonicalJson(results);
  return { resultsJson, resultsHash: sha256Hex(resultsJson), engineVersion: ENGINE_VERSION, elapsedMs: Math.round(performance.now() - start) };
}, isRefusal);
