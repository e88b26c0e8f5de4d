// Worker module for the evaluation pool tests: tasks that take a chosen time, exhaust memory or fail.
import { defineWorker } from '../../server/evaluation/worker-support';

type Task = { kind: 'echo'; value: number } | { kind: 'busy'; ms: number } | { kind: 'hog' } | { kind: 'refuse' };

export default defineWorker((task: Task) => {
  switch (task.kind) {
    case 'echo':
      return { value: task.value, threadId: process.pid };
    case 'busy': {
      // Pure CPU, like a long evaluation: it never yields to the worker's event loop.
      const end = Date.now() + task.ms;
      let x = 0;
      while (Date.now() < end) x += Math.sqrt(x + 1);
      return { value: x > 0 ? 1 : 0 };
    }
    case 'hog': {
      const keep: number[][] = [];
      for (;;) keep.push(Array.from({ length: 1e5 }, (_, i) => i * 1.5));
    }
    case 'refuse':
      throw Object.assign(new Error('step "s1": confidence must lie in (0, 1)'), { details: [{ field: 'steps.0.confidence' }] });
  }
});
