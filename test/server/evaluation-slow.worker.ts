// Worker module for the evaluation API tests: the real engine task, followed by extra CPU time or
// memory when the worksheet title asks for it ("slow 2000 …" = 2000 ms more, "hog …" = exhaust the
// heap). It stands in for a really large worksheet without needing one.
import engineTask from '../../server/evaluation/engine-task';
import type { WorkerEnvelope } from '../../server/evaluation/pool';
import type { PoolTask } from '../../server/evaluation/evaluator';

export default async function slowTask(envelope: WorkerEnvelope<PoolTask>) {
  const reply = await engineTask(envelope);
  const title = envelope.task.kind === 'evaluate' ? envelope.task.document.title : '';
  const slow = /^slow (\d+)/.exec(title);
  if (slow) {
    const end = Date.now() + Number(slow[1]);
    let x = 0;
    while (Date.now() < end) x += Math.sqrt(x + 1);
    if (x < 0) throw new Error('unreachable');
  }
  if (title.startsWith('hog')) {
    const keep: number[][] = [];
    // Plain JS arrays live on the heap the limit applies to (typed arrays would not).
    for (;;) keep.push(new Array(1e6).fill(keep.length + 0.5));
  }
  return reply;
}
