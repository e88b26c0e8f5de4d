// Evaluation as the routes use it: a validated worksheet in, canonical results and their hash out.
//
// Results are a pure function of (document, datasets, engine version) and the document names its
// datasets by the SHA-256 of their bytes, so the content hash and the engine version identify the
// results. They are looked up, in order, in an in-process LRU (only a cache), in the revisions
// already stored (any saved revision with the same content and engine), and only then computed in
// the worker pool.
import { and, eq } from 'drizzle-orm';
import { ENGINE_VERSION } from '@shared/engine/version';
import type { Worksheet } from '@shared/format/worksheet';
import { revisions } from '../../schema/index';
import type { Database } from '../db/client';
import { SizedLru } from './lru';
import { EvaluationPool, type EvaluationPoolOptions } from './pool';

/** What the engine gets for each dataset a data step names: the stored bytes and how to read them. */
export interface DatasetInput {
  bytes: Uint8Array;
  mediaType: string;
}

export interface EvaluationTask {
  document: Worksheet;
  datasets: Record<string, DatasetInput>;
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
}

export class Evaluator {
  readonly engineVersion = ENGINE_VERSION;
  private pool: EvaluationPool<EvaluationTask, EvaluationReply> | undefined;
  private readonly cache: SizedLru<string, EvaluationReply>;

  constructor(
    private readonly db: Database,
    private readonly options: EvaluatorOptions = {},
  ) {
    this.cache = new SizedLru(options.cacheSize ?? 64 * 1024 * 1024, (r) => r.resultsJson.length + 200);
  }

  /** The pool starts on first use, so apps that never evaluate (most test suites) start no threads. */
  private workers(): EvaluationPool<EvaluationTask, EvaluationReply> {
    this.pool ??= new EvaluationPool<EvaluationTask, EvaluationReply>(this.options);
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
    const reply = await this.workers().run({ document, datasets });
    if (reply.engineVersion !== this.engineVersion) {
      // Workers load the same code as this process; a mismatch means a deployment mid-flight.
      throw new Error(`engine version mismatch: worker ${reply.engineVersion}, server ${this.engineVersion}`);
    }
    this.cache.set(key, reply);
    return { ...reply, cached: false };
  }

  async close(): Promise<void> {
    await this.pool?.close();
    this.pool = undefined;
  }
}
