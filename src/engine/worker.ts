import { parentPort, workerData, type MessagePort } from 'node:worker_threads';
import type { Evaluator, RecheckTask } from './pool-task.js';
import type { FromWorker, ToWorker, WorkerData } from './pool-protocol.js';

/**
 * A recheck worker: runs recheck tasks sent by the pool and posts their results.
 * After every post it bumps a shared counter and wakes the main thread, which
 * waits on it inside its write transaction (it cannot take events there). The
 * analysis code is imported dynamically so that a failure to load it is posted
 * as a message instead of dying where the waiting main thread cannot see it.
 */

const { port, signal } = workerData as WorkerData & { port: MessagePort };

function post(m: FromWorker): void {
  port.postMessage(m);
  Atomics.add(signal, 0, 1);
  Atomics.notify(signal, 0);
}

const message = (e: unknown): string => (e instanceof Error ? (e.stack ?? e.message) : String(e));

try {
  const [ev, tasks]: [Evaluator, typeof import('./pool-task.js')] = await Promise.all([import('./evaluate.js'), import('./pool-task.js')]);
  port.on('message', (m: ToWorker) => {
    try {
      post({ kind: 'done', run: m.run, batch: m.batch, computed: m.tasks.flatMap((t: RecheckTask) => tasks.runTask(ev, t)) });
    } catch (e) {
      post({ kind: 'failed', run: m.run, batch: m.batch, error: message(e) });
    }
  });
  post({ kind: 'ready' });
  // Also as an event, for a caller that awaits the start instead of blocking on it.
  parentPort?.postMessage('ready');
} catch (e) {
  post({ kind: 'fatal', error: message(e) });
}
