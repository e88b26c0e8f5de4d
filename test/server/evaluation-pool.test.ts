// The evaluation pool: long work runs off the request thread, limits stop only the task that hit
// them, and the pool keeps serving afterwards.
import { expect } from 'chai';
import { EvaluationFailedError, EvaluationLimitError, EvaluationPool } from '../../server/evaluation/pool';

const workerFile = new URL('./evaluation-pool.worker.ts', import.meta.url);

describe('evaluation pool', function () {
  this.timeout(30_000);
  let pool: EvaluationPool<unknown, { value: number }>;

  afterEach(async () => {
    await pool?.close();
  });

  it('runs a task in a worker thread (TypeScript through the inherited tsx loader)', async () => {
    pool = new EvaluationPool({ workerFile, maxThreads: 2 });
    const reply = await pool.run({ kind: 'echo', value: 42 });
    expect(reply.value).to.equal(42);
  });

  it('answers a small task while a 2-second task is still running', async () => {
    pool = new EvaluationPool({ workerFile, maxThreads: 2, timeLimitMs: 10_000 });
    await pool.run({ kind: 'echo', value: 0 }); // warm one worker
    const order: string[] = [];
    const t0 = performance.now();
    const big = pool.run({ kind: 'busy', ms: 2000 }).then(() => {
      order.push('big');
      return performance.now() - t0;
    });
    await new Promise((r) => setTimeout(r, 100));
    const smallStart = performance.now();
    const small = pool.run({ kind: 'echo', value: 7 }).then(() => {
      order.push('small');
      return performance.now() - smallStart;
    });
    const [bigMs, smallMs] = await Promise.all([big, small]);
    expect(order).to.deep.equal(['small', 'big']);
    expect(bigMs).to.be.at.least(1900);
    // The small task did not wait for the big one (it would have waited about 1.9 s).
    expect(smallMs).to.be.below(bigMs - 500);
  });

  it('stops a task at the time limit with evaluation_timeout and keeps serving', async () => {
    pool = new EvaluationPool({ workerFile, maxThreads: 1, timeLimitMs: 300 });
    const t0 = performance.now();
    const error = await pool.run({ kind: 'busy', ms: 20_000 }).then(
      () => null,
      (e: unknown) => e,
    );
    expect(error).to.be.instanceOf(EvaluationLimitError);
    expect((error as EvaluationLimitError).code).to.equal('evaluation_timeout');
    expect((error as Error).message).to.contain('0.3 s');
    expect(performance.now() - t0).to.be.below(10_000);
    expect((await pool.run({ kind: 'echo', value: 3 })).value).to.equal(3);
  });

  it('stops a task at the memory limit with evaluation_memory and keeps serving', async () => {
    pool = new EvaluationPool({ workerFile, maxThreads: 1, memoryLimitMb: 48 });
    const error = await pool.run({ kind: 'hog' }).then(
      () => null,
      (e: unknown) => e,
    );
    expect(error).to.be.instanceOf(EvaluationLimitError);
    expect((error as EvaluationLimitError).code).to.equal('evaluation_memory');
    expect((error as Error).message).to.contain('48 MB');
    expect((await pool.run({ kind: 'echo', value: 5 })).value).to.equal(5);
  });

  it('counts the time limit from the start of the task, not from the queue', async () => {
    pool = new EvaluationPool({ workerFile, maxThreads: 1, timeLimitMs: 1500 });
    await pool.run({ kind: 'echo', value: 0 });
    // Two tasks of 1 s on one thread: the second waits 1 s, then runs 1 s; 2 s in all > 1.5 s.
    const results = await Promise.all([pool.run({ kind: 'busy', ms: 1000 }), pool.run({ kind: 'busy', ms: 1000 })]);
    expect(results.map((r) => r.value)).to.deep.equal([1, 1]);
  });

  it('passes a refusal of the document back as EvaluationFailedError with its message', async () => {
    pool = new EvaluationPool({ workerFile, maxThreads: 1 });
    const error = await pool.run({ kind: 'refuse' }).then(
      () => null,
      (e: unknown) => e,
    );
    expect(error).to.be.instanceOf(EvaluationFailedError);
    expect((error as Error).message).to.equal('step "s1": confidence must lie in (0, 1)');
    expect((error as EvaluationFailedError).details).to.deep.equal([{ field: 'steps.0.confidence' }]);
  });
});
