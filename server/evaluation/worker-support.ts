// The worker side of the evaluation pool: tells the pool the task has started (so the time limit
// counts running time only), then runs it and turns a refusal into a reply instead of a crash.
import type { WorkerEnvelope, WorkerReply } from './pool';

export function defineWorker<T, R>(
  run: (task: T) => R | Promise<R>,
  isRefusal: (error: unknown) => boolean = () => true,
): (envelope: WorkerEnvelope<T>) => Promise<WorkerReply<R>> {
  return async ({ started, task }) => {
    started.postMessage('started');
    started.close();
    try {
      return { ok: await run(task) };
    } catch (error) {
      if (!isRefusal(error)) throw error;
      const e = error as { message?: unknown; details?: unknown };
      return { failed: { message: typeof e.message === 'string' ? e.message : String(error), details: e.details } };
    }
  };
}
