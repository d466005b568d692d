import { factoredAt, type Factored } from './factors.js';

/**
 * A loop sampled on the jw axis: ln|L| and unwrapped phase at sorted frequencies.
 * Where phase turns quickly (a delay, a lightly damped mode) the samples are
 * refined by bisection in log frequency, so brackets for crossings and peaks are
 * never skipped over. Refinement is limited by a predicate (only where it matters)
 * and a point budget.
 */
export interface LoopSamples {
  readonly wRadS: Float64Array;
  /** ln|L(jw)|. */
  readonly logMag: Float64Array;
  /** Unwrapped phase in rad, delay included. */
  readonly phaseRad: Float64Array;
  /** True when the point budget stopped refinement before it was done. */
  readonly truncated: boolean;
}

/** Decides whether the interval between two samples must be split further. */
export type RefineTest = (wa: number, la: number, pa: number, wb: number, lb: number, pb: number) => boolean;

/** Samples f at the given frequencies, bisecting every interval that `needsSplit` flags (depth-first, left to right). */
export function sampleLoop(f: Factored, wRadS: ArrayLike<number>, needsSplit: RefineTest | null, budget = 6000): LoopSamples {
  const ws: number[] = [];
  const ls: number[] = [];
  const ps: number[] = [];
  const v = new Float64Array(4);
  let truncated = false;
  const at = (w: number): [number, number] => {
    factoredAt(f, w, v);
    return [v[0]!, v[1]!];
  };
  const split = (wa: number, la: number, pa: number, wb: number, lb: number, pb: number, depth: number): void => {
    if (needsSplit === null || depth > 40 || !needsSplit(wa, la, pa, wb, lb, pb)) return;
    if (ws.length >= budget) { truncated = true; return; }
    const wm = Math.sqrt(wa * wb);
    if (!(wm > wa && wm < wb)) return;
    const [lm, pm] = at(wm);
    split(wa, la, pa, wm, lm, pm, depth + 1);
    ws.push(wm); ls.push(lm); ps.push(pm);
    split(wm, lm, pm, wb, lb, pb, depth + 1);
  };
  let prev: [number, number, number] | null = null;
  for (let i = 0; i < wRadS.length; i++) {
    const w = wRadS[i]!;
    const [l, p] = at(w);
    if (prev !== null) split(prev[0], prev[1], prev[2], w, l, p, 0);
    ws.push(w); ls.push(l); ps.push(p);
    prev = [w, l, p];
  }
  return { wRadS: Float64Array.from(ws), logMag: Float64Array.from(ls), phaseRad: Float64Array.from(ps), truncated };
}
