// Evaluation as the routes use it: a validated worksheet in, canonical results and their hash out.
//
// Results are a pure function of (document, datasets, engine version) and the document names its
// datasets by the SHA-256 of their bytes, so the content hash and the engine version identify the
// results. They are looked up, in order, in an in-process LRU (only a cache), in the revisions
// already stored (any saved revision with the same content and engine), and only then computed in
// the worker pool.
import { and, eq } from 'drizzle-orm';
import { ENGINE_VERSION } from '@shared/engine/version';
import type { Table } from '@shared/engine/table/parse';
import type { Worksheet } from '@shared/format/worksheet';
import { datasets, revisions } from '../../schema/index';
import type { Database } from '../db/client';
import type { ParsedInfo } from '../datasets/store';
import { UploadProblem, type UploadProblemCode } from '../datasets/parse';
import { SizedLru } from './lru';
import { EvaluationFailedError, EvaluationPool, type EvaluationPoolOptions } from './pool';

/** What the engine gets for each dataset a data step names: the stored bytes and how to read them. */
export interface DatasetInput {
  bytes: Uint8Array;
  mediaType: string;
}

export interface EvaluationTask {
  kind: 'evaluate';
  document: Worksheet;
  datasets: Record<string, DatasetInput>;
}

/** Reading an uploaded file also runs in the pool: a 50 MB file is seconds of CPU. */
export interface ParseTask {
  kind: 'parse';
  bytes: Uint8Array;
  mediaType: string;
}

export interface ParseReply {
  info: ParsedInfo;
}

/** The whole parsed table of a stored dataset (for previews and comparisons). */
export interface TableTask {
  kind: 'table';
  bytes: Uint8Array;
  mediaType: string;
}

export interface TableReply {
  table: Table;
}

export type PoolTask = EvaluationTask | ParseTask | TableTask;
export type PoolReply = EvaluationReply | ParseReply | TableReply;

function tableSize(table: Table): number {
  let size = 1000;
  for (const c of table.columns) {
    if (c.type === 'number') size += c.values.byteLength;
    else for (const v of c.values) size += 2 * v.length + 16;
  }
  return size;
}

export interface EvaluationReply {
  /** Canonical JSON of the EvaluationResult; resultsHash is its SHA-256. */
  resultsJson: string;
  resultsHash: string;
  engineVersion: string;
  elapsedMs: number;
}

export interface Evaluated extends EvaluationReply {
  cached: boolean;
}

export interface EvaluatorOptions extends EvaluationPoolOptions {
  /** Upper bound of the in-process results cache, in UTF-16 code units of JSON. Default 64 Mi. */
  cacheSize?: number;
  /** Upper bound of the in-process cache of parsed dataset tables, in bytes. Default 256 MiB. */
  tableCacheBytes?: number;
}

export class Evaluator {
  readonly engineVersion = ENGINE_VERSION;
  private pool: EvaluationPool<PoolTask, PoolReply> | undefined;
  private readonly cache: SizedLru<string, EvaluationReply>;
  private readonly tables: SizedLru<string, Table>;

  constructor(
    private readonly db: Database,
    private readonly options: EvaluatorOptions = {},
  ) {
    this.cache = new SizedLru(options.cacheSize ?? 64 * 1024 * 1024, (r) => r.resultsJson.length + 200);
    this.tables = new SizedLru(options.tableCacheBytes ?? 256 * 1024 * 1024, tableSize);
  }

  /** The pool starts on first use, so apps that never evaluate (most test suites) start no threads. */
  private workers(): EvaluationPool<PoolTask, PoolReply> {
    this.pool ??= new EvaluationPool<PoolTask, PoolReply>(this.options);
    return this.pool;
  }

  /**
   * Results of `document` (validated) whose canonical JSON hashes to `contentHash`. `loadDatasets`
   * is called only when the results must really be computed.
   */
  async evaluate(
    document: Worksheet,
    contentHash: string,
    loadDatasets: () => Promise<Record<string, DatasetInput>>,
    options: { useCache?: boolean } = {},
  ): Promise<Evaluated> {
    const key = `${this.engineVersion}:${contentHash}`;
    if (options.useCache ?? true) {
      const hit = this.cache.get(key);
      if (hit) return { ...hit, cached: true, elapsedMs: 0 };
      const [stored] = await this.db
        .select({ results: revisions.results, resultsHash: revisions.resultsHash })
        .from(revisions)
        .where(and(eq(revisions.contentHash, contentHash), eq(revisions.engineVersion, this.engineVersion)))
        .limit(1);
      if (stored) {
        const reply = { resultsJson: stored.results, resultsHash: stored.resultsHash, engineVersion: this.engineVersion, elapsedMs: 0 };
        this.cache.set(key, reply);
        return { ...reply, cached: true };
      }
    }
    const datasets = await loadDatasets();
    const reply = (await this.workers().run({ kind: 'evaluate', document, datasets })) as EvaluationReply;
    if (reply.engineVersion !== this.engineVersion) {
      // Workers load the same code as this process; a mismatch means a deployment mid-flight.
      throw new Error(`engine version mismatch: worker ${reply.engineVersion}, server ${this.engineVersion}`);
    }
    this.cache.set(key, reply);
    return { ...reply, cached: false };
  }

  /** Parses an uploaded file in a worker. Throws UploadProblem for a bad file. */
  async parseUpload(bytes: Uint8Array, mediaType: string): Promise<ParsedInfo> {
    try {
      const reply = (await this.workers().run({ kind: 'parse', bytes, mediaType })) as ParseReply;
      return reply.info;
    } catch (error) {
      if (error instanceof EvaluationFailedError) {
        const d = (error.details ?? {}) as { status?: number; code?: UploadProblemCode; line?: number; column?: number };
        throw new UploadProblem(d.status ?? 422, d.code ?? 'bad_file', error.message, d.line, d.column);
      }
      throw error;
    }
  }

  /** The parsed table of a stored dataset (null if there is none); parsed in a worker, cached. */
  async table(datasetId: string): Promise<Table | null> {
    const hit = this.tables.get(datasetId);
    if (hit) return hit;
    const [row] = await this.db.select({ bytes: datasets.bytes, mediaType: datasets.mediaType }).from(datasets).where(eq(datasets.id, datasetId));
    if (!row) return null;
    const bytes = new Uint8Array(row.bytes.buffer, row.bytes.byteOffset, row.bytes.byteLength);
    const reply = (await this.workers().run({ kind: 'table', bytes, mediaType: row.mediaType })) as TableReply;
    this.tables.set(datasetId, reply.table);
    return reply.table;
  }

  async close(): Promise<void> {
    await this.pool?.close();
    this.pool = undefined;
  }
}
