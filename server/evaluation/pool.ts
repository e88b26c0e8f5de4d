// A pool of worker threads that runs evaluations off the request thread.
//
// Why workers: one large worksheet (millions of rows, many steps) takes seconds of pure CPU; run on
// the event loop it would stall every other user's request. Each evaluation gets a time limit and
// the worker a heap limit; hitting either terminates that worker only (piscina replaces it) and the
// caller gets an EvaluationLimitError, which the routes turn into a 422.
//
// The time limit counts from the moment a worker starts the task (the worker reports it through a
// MessagePort), not from submission, so a busy pool does not make small evaluations time out.
// Waiting in the queue has its own, longer bound (longer still before the first worker is up).
import os from 'node:os';
import { MessageChannel } from 'node:worker_threads';
import { Piscina } from 'piscina';

export type EvaluationLimit = 'evaluation_timeout' | 'evaluation_memory' | 'evaluation_busy';

/** A limit was hit; the pool itself is healthy and keeps serving. */
export class EvaluationLimitError extends Error {
  constructor(
    readonly code: EvaluationLimit,
    message: string,
  ) {
    super(message);
    this.name = 'EvaluationLimitError';
  }
}

/** The engine refused the document as a whole (per-step problems are inside the results). */
export class EvaluationFailedError extends Error {
  constructor(
    message: string,
    readonly details?: unknown,
  ) {
    super(message);
    this.name = 'EvaluationFailedError';
  }
}

export interface EvaluationPoolOptions {
  /** Worker module (default: ./engine-task.ts, which runs the engine). Tests may pass another. */
  workerFile?: string | URL;
  maxThreads?: number;
  /** Per-evaluation wall-time limit once running. Default EVAL_TIME_LIMIT_MS or 10 s. */
  timeLimitMs?: number;
  /** Heap limit per worker (old generation). Default EVAL_MEMORY_LIMIT_MB or 512 MB. */
  memoryLimitMb?: number;
  /** Longest wait for a free worker before giving up. Default 60 s. */
  queueLimitMs?: number;
}

/** What a worker module's default export receives; `started` is posted to before any work. */
export interface WorkerEnvelope<T> {
  started: import('node:worker_threads').MessagePort;
  task: T;
}

/** What a worker returns after a successful run; refusals come back as `{ failed }`. */
export type WorkerReply<R> = { ok: R } | { failed: { message: string; details?: unknown } };

function envNumber(name: string): number | undefined {
  const raw = process.env[name];
  if (!raw) return undefined;
  const value = Number(raw);
  return Number.isFinite(value) && value > 0 ? value : undefined;
}

export class EvaluationPool<T = unknown, R = unknown> {
  readonly timeLimitMs: number;
  readonly memoryLimitMb: number;
  readonly queueLimitMs: number;
  private readonly piscina: Piscina;
  /** Set once a worker has started a task: until then, waiting is thread start-up, not overload. */
  private warm = false;

  constructor(options: EvaluationPoolOptions = {}) {
    this.timeLimitMs = options.timeLimitMs ?? envNumber('EVAL_TIME_LIMIT_MS') ?? 10_000;
    this.memoryLimitMb = options.memoryLimitMb ?? envNumber('EVAL_MEMORY_LIMIT_MB') ?? 512;
    this.queueLimitMs = options.queueLimitMs ?? 60_000;
    const workerFile = options.workerFile ?? new URL('./engine-task.ts', import.meta.url);
    const maxThreads = options.maxThreads ?? envNumber('EVAL_THREADS') ?? Math.max(2, os.availableParallelism());
    this.piscina = new Piscina({
      filename: workerFile instanceof URL ? workerFile.href : workerFile,
      // All threads start with the pool and stay: a worker's start-up (loading the engine) costs
      // far more than an evaluation, and the pool itself is created on first use.
      minThreads: maxThreads,
      maxThreads,
      idleTimeout: 10 * 60_000,
      // Workers inherit the parent's execArgv (tsx's loader), so they run TypeScript too.
      resourceLimits: { maxOldGenerationSizeMb: this.memoryLimitMb, maxYoungGenerationSizeMb: 64 },
    });
    // A terminated worker emits 'error' on the pool in some paths; the task promise carries it.
    this.piscina.on('error', () => {});
  }

  get threads(): number {
    return this.piscina.threads.length;
  }

  get queueSize(): number {
    return this.piscina.queueSize;
  }

  async run(task: T): Promise<R> {
    const { port1, port2 } = new MessageChannel();
    const abort = new AbortController();
    let timedOut = false;
    let queuedOut = false;
    let runTimer: NodeJS.Timeout | undefined;
    // Loading the engine in a fresh worker can take long on a busy machine; the queue bound is
    // for overload of warm workers, so it waits for the first start (with a generous cap).
    const queueTimer = setTimeout(
      () => {
        queuedOut = true;
        abort.abort();
      },
      this.warm ? this.queueLimitMs : Math.max(this.queueLimitMs, 5 * 60_000),
    );
    port1.once('message', () => {
      this.warm = true;
      clearTimeout(queueTimer);
      runTimer = setTimeout(() => {
        timedOut = true;
        abort.abort();
      }, this.timeLimitMs);
    });
    try {
      const envelope: WorkerEnvelope<T> = { started: port2, task };
      const reply = (await this.piscina.run(envelope, {
        transferList: [port2],
        signal: abort.signal,
      })) as WorkerReply<R>;
      if ('failed' in reply) throw new EvaluationFailedError(reply.failed.message, reply.failed.details);
      return reply.ok;
    } catch (error) {
      if (error instanceof EvaluationFailedError) throw error;
      if (timedOut) {
        throw new EvaluationLimitError(
          'evaluation_timeout',
          `The evaluation took longer than the limit of ${formatSeconds(this.timeLimitMs)} and was stopped. ` +
            'Reduce the data or the number of steps.',
        );
      }
      if (queuedOut) {
        throw new EvaluationLimitError(
          'evaluation_busy',
          `The evaluation could not start within ${formatSeconds(this.queueLimitMs)}: the server is busy. Try again.`,
        );
      }
      if ((error as { code?: string }).code === 'ERR_WORKER_OUT_OF_MEMORY') {
        throw new EvaluationLimitError(
          'evaluation_memory',
          `The evaluation needed more than the memory limit of ${this.memoryLimitMb} MB and was stopped. ` +
            'Reduce the data or the number of steps.',
        );
      }
      throw error;
    } finally {
      clearTimeout(queueTimer);
      clearTimeout(runTimer);
      port1.close();
    }
  }

  async close(): Promise<void> {
    await this.piscina.destroy();
  }
}

function formatSeconds(ms: number): string {
  return ms % 1000 === 0 ? `${ms / 1000} s` : `${(ms / 1000).toFixed(1)} s`;
}
