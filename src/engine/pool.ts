import { MessageChannel, receiveMessageOnPort, Worker, type MessagePort } from 'node:worker_threads';
import { runTask, type Computed, type Evaluator, type RecheckTask } from './pool-task.js';
import type { FromWorker, ToWorker, WorkerData } from './pool-protocol.js';
import { poolSettings, workerExecArgv, workerSource } from './pool-setup.js';

/**
 * A few worker threads that analyse recheck tasks in parallel, driven
 * synchronously: the main thread sits inside a write transaction (better-sqlite3
 * transactions are synchronous), hands out batches, and sleeps on a shared
 * counter (Atomics.wait) until a worker posts, reading the posts with
 * receiveMessageOnPort. Results go back to the caller, who alone writes the
 * store. Anything that goes wrong with a worker ends in the main thread
 * running the work itself, so the outcome never depends on the pool.
 */

/** Analysed loops per message at least. */
const BATCH_MIN_LOOPS = 4;
/**
 * Batches shrink as the work runs out (guided scheduling): each takes this
 * share of what is left per worker, so early batches are large (few wake-ups of
 * the main thread) and the last ones small (no worker long alone at the end).
 */
const BATCHES_PER_WORKER = 4;
/** Batches queued per worker, so it never idles while the main thread reads its last post. */
const IN_FLIGHT = 2;
/** No post for this long: the workers are taken for stuck and the main thread does the rest. */
const STALL_MS = 60_000;
/** The same before any worker said it is ready: a worker that failed to start posts nothing, and its error event cannot reach a blocked thread. */
const BOOT_MS = 15_000;

interface Slot {
  readonly worker: Worker;
  readonly port: MessagePort;
  inFlight: number;
  alive: boolean;
  ready: boolean;
}

interface Batch {
  readonly id: number;
  readonly tasks: readonly RecheckTask[];
  readonly slot: Slot;
}

const loopsIn = (tasks: readonly RecheckTask[]) => tasks.reduce((n, t) => n + t.analyse.length, 0);

export class AnalysisPool {
  private readonly slots: Slot[] = [];
  private readonly signal = new Int32Array(new SharedArrayBuffer(4));
  private runs = 0;
  /** Set when the workers failed us; the pool is then not used again. */
  broken = false;
  /** Loops analysed so far by the workers and by the main thread (its share, and work it took over). */
  readonly analysed = { byWorkers: 0, byMain: 0 };

  private readonly stallMs: number;
  private readonly starts: Promise<void>[] = [];

  constructor(workers: number, src: URL, opts: { stallMs?: number } = {}) {
    this.stallMs = opts.stallMs ?? STALL_MS;
    for (let i = 0; i < workers; i++) {
      const { port1, port2 } = new MessageChannel();
      const data: WorkerData & { port: MessagePort } = { signal: this.signal, port: port2 };
      const worker = new Worker(src, { workerData: data, transferList: [port2], execArgv: workerExecArgv() });
      const slot: Slot = { worker, port: port1, inFlight: 0, alive: true, ready: false };
      // Seen once the main thread is back in its event loop: the next run does without this worker (never a crash).
      worker.on('error', () => { slot.alive = false; });
      worker.on('exit', () => { slot.alive = false; });
      this.starts.push(new Promise((resolve) => {
        worker.once('message', () => { slot.ready = true; resolve(); });
        worker.once('error', () => resolve());
        worker.once('exit', () => resolve());
      }));
      // Neither may keep the process alive: a finished command exits with its workers idle.
      worker.unref();
      port1.unref();
      this.slots.push(slot);
    }
  }

  get size(): number {
    return this.slots.length;
  }

  /** Resolves once every worker has started (or failed to): a run then hands work to all of them from the first batch. */
  started(): Promise<void> {
    return Promise.all(this.starts).then(() => undefined);
  }

  /**
   * Results of every task, by loop id; blocks until all are in. The main thread
   * analyses too (so n workers use n + 1 cores) and takes over the work of a
   * worker that fails.
   */
  run(tasks: readonly RecheckTask[], ev: Evaluator): Map<number, Computed> {
    const run = ++this.runs;
    const out = new Map<number, Computed>();
    const queue = [...tasks];
    let queuedLoops = loopsIn(queue);
    const open = new Map<number, Batch>();
    let nextId = 0;
    const keep = (cs: readonly Computed[], byMain: boolean) => {
      for (const c of cs) out.set(c.id, c);
      if (byMain) this.analysed.byMain += cs.length;
      else this.analysed.byWorkers += cs.length;
    };
    const requeue = (b: Batch) => { queue.unshift(...b.tasks); queuedLoops += loopsIn(b.tasks); open.delete(b.id); };
    const dispatch = () => {
      for (const s of this.slots) {
        while (s.alive && s.inFlight < IN_FLIGHT && queue.length > 0) {
          const want = Math.max(BATCH_MIN_LOOPS, Math.ceil(queuedLoops / ((this.slots.length + 1) * BATCHES_PER_WORKER)));
          const batch: RecheckTask[] = [];
          for (let n = 0; queue.length > 0 && n < want; ) {
            const t = queue.shift()!;
            batch.push(t);
            n += t.analyse.length;
            queuedLoops -= t.analyse.length;
          }
          const b: Batch = { id: nextId++, tasks: batch, slot: s };
          open.set(b.id, b);
          s.inFlight++;
          s.port.postMessage({ run, batch: b.id, tasks: batch } satisfies ToWorker);
        }
      }
    };
    const onMessage = (s: Slot, m: FromWorker) => {
      if (m.kind === 'ready') {
        s.ready = true;
        return;
      }
      if (m.kind === 'fatal') {
        s.alive = false;
        s.inFlight = 0;
        for (const b of [...open.values()]) if (b.slot === s) requeue(b);
        return;
      }
      s.inFlight--;
      if (m.run !== run) return; // a late post of a run that was given up on
      const b = open.get(m.batch);
      if (b === undefined) return;
      open.delete(b.id);
      // A task that threw is run here: it throws exactly as in a serial recheck, or succeeds if only the worker was at fault.
      if (m.kind === 'done') keep(m.computed, false);
      else keep(b.tasks.flatMap((t) => runTask(ev, t)), true);
    };

    dispatch();
    let lastPost = Date.now();
    while (open.size > 0 || queue.length > 0) {
      const seen = Atomics.load(this.signal, 0);
      let got = false;
      for (const s of this.slots) {
        for (let m = receiveMessageOnPort(s.port); m !== undefined; m = receiveMessageOnPort(s.port)) {
          onMessage(s, m.message as FromWorker);
          got = true;
        }
      }
      if (!this.slots.some((s) => s.alive)) this.broken = true;
      if (got && !this.broken) {
        lastPost = Date.now();
        dispatch();
      }
      if (queue.length > 0 && !this.broken) {
        // The main thread works too, one cascade tree at a time, looking in on the workers between trees.
        const t = queue.shift()!;
        queuedLoops -= t.analyse.length;
        keep(runTask(ev, t), true);
        lastPost = Date.now(); // the workers' silence counts from when this thread is free to notice it
        continue;
      }
      if (got) continue;
      // Workers still starting: take their batches back rather than wait (what they post later is ignored).
      const unstarted = [...open.values()].filter((b) => !b.slot.ready);
      if (unstarted.length > 0) {
        for (const b of unstarted) requeue(b);
        continue;
      }
      const limit = this.slots.some((s) => s.ready) ? this.stallMs : Math.min(BOOT_MS, this.stallMs);
      if (this.broken || Date.now() - lastPost > limit) {
        this.broken = true;
        for (const b of [...open.values()]) requeue(b);
        keep(queue.flatMap((t) => runTask(ev, t)), true);
        break;
      }
      Atomics.wait(this.signal, 0, seen, Math.min(1000, this.stallMs));
    }
    if (this.broken) this.close();
    return out;
  }

  /** Stops the workers. */
  close(): void {
    for (const s of this.slots) {
      s.alive = false;
      s.port.close();
      void s.worker.terminate();
    }
  }
}

let shared: AnalysisPool | null = null;

/**
 * The process's pool, started on first use, or null when there is none (no
 * worker allowed, or the code for one missing).
 */
export function analysisPool(): AnalysisPool | null {
  const { workers } = poolSettings();
  // Turned off for a while (workers = 0), a started pool stays for later; another size replaces it.
  if (workers < 1) return null;
  if (shared !== null && (shared.broken || shared.size !== workers)) {
    shared.close();
    shared = null;
  }
  if (shared === null) {
    const src = workerSource();
    if (src === null) return null;
    shared = new AnalysisPool(workers, src);
  }
  return shared;
}

/** Stops the shared pool (tests; a process may also just exit, the workers do not hold it). */
export function closeAnalysisPool(): void {
  shared?.close();
  shared = null;
}
