import type { Computed, RecheckTask } from './pool-task.js';

/** Messages between the recheck pool (main thread) and its workers. */

/** What a worker is started with; its MessagePort travels in the transfer list beside it. */
export interface WorkerData {
  /** Bumped (and notified) after every message a worker posts. */
  readonly signal: Int32Array;
}

/** A batch of tasks; `run` tells one recheck's batches from another's. */
export interface ToWorker {
  readonly run: number;
  readonly batch: number;
  readonly tasks: readonly RecheckTask[];
}

export type FromWorker =
  | { readonly kind: 'ready' }
  /** The analysis code could not be loaded: this worker is of no use. */
  | { readonly kind: 'fatal'; readonly error: string }
  | { readonly kind: 'done'; readonly run: number; readonly batch: number; readonly computed: readonly Computed[] }
  /** A task threw; the main thread runs the batch itself, so the error surfaces exactly as in a serial recheck. */
  | { readonly kind: 'failed'; readonly run: number; readonly batch: number; readonly error: string };
