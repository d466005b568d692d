import { frequencyRangeRadS, frequencyResponse, loopGridRadS } from '../analysis/freq.js';
import { factorTf } from '../analysis/factors.js';
import { stepResponse } from '../analysis/step.js';
import { tfSeries } from '../analysis/tf.js';
import { compensatorTf } from '../design/blocks-tf.js';
import { Cascade } from '../engine/cascade.js';
import type { LoopResult, LoopState, Machine } from '../engine/index.js';
import type { Compensator } from '../model/blocks.js';
import type { BodeVM, StepVM } from './view-model.js';

/**
 * The curves the loop view draws: the open-loop frequency response and the
 * closed-loop step of each variant, computed by the analysis core on the plant
 * the loop really sees (behind its closed inner loops, as the engine forms it).
 */

/** A cascade of the machine's current loops, with one loop's state replaced (a draft or an old revision). */
export function cascadeFor(m: Machine, ref: string, override?: LoopState): { cascade: Cascade; id: number } {
  const loops = m.listLoops();
  const index = new Map(loops.map((l, i) => [l.ref, i]));
  const cascade = new Cascade((i) => {
    const l = loops[i]!;
    const state = l.ref === ref && override ? override : m.revision(l.ref).state;
    return { ref: l.ref, state, innerId: l.inner === null ? null : (index.get(l.inner) ?? null) };
  });
  return { cascade, id: index.get(ref)! };
}

// Enough points for a smooth sketch at any window width; the sketch resamples them.
const POINTS_PER_DECADE = 60;

/** What the curves need to know of one analysed variant. */
export interface CurveVariant {
  readonly variant: string;
  readonly crossoversRadS: readonly number[];
  readonly phaseCrossoversRadS: readonly number[];
  /** Only stable loops get a step response. */
  readonly stable: boolean;
  readonly finalValue: number;
}

/** The analysed variants of a result. */
export function curveVariantsOf(r: LoopResult): CurveVariant[] {
  return r.variants.flatMap((v) =>
    v.metrics === null ? [] : [{
      variant: v.variant,
      crossoversRadS: v.metrics.gainCrossoversRadS,
      phaseCrossoversRadS: v.metrics.phaseCrossoversRadS,
      stable: v.metrics.stable,
      finalValue: v.metrics.closedLoopDcGain,
    }],
  );
}

/** Open-loop Bode data and step response of each variant with compensator `comp`. */
export function loopCurves(m: Machine, ref: string, comp: Compensator, variants: readonly CurveVariant[], override?: LoopState): { bode: BodeVM[]; step: StepVM[] } {
  const { cascade, id } = cascadeFor(m, ref, override);
  const c = compensatorTf(comp);
  const bode: BodeVM[] = [];
  const step: StepVM[] = [];
  for (const v of variants) {
    const plant = cascade.plant(id, cascade.resolve(id, v.variant)).tf;
    const f = factorTf(tfSeries(c, plant));
    const marks = [...v.crossoversRadS, ...v.phaseCrossoversRadS].filter((w) => w > 0 && Number.isFinite(w));
    let [lo, hi] = frequencyRangeRadS(f, marks);
    // The sketch is read around the crossovers: beyond two decades either side, a column is better spent near them.
    if (marks.length > 0) {
      lo = Math.max(lo, Math.min(...marks) / 100);
      hi = Math.min(hi, Math.max(...marks) * 100);
    }
    const fr = frequencyResponse(f, loopGridRadS(f, lo, hi, POINTS_PER_DECADE));
    bode.push({
      variant: v.variant,
      wRadS: Array.from(fr.wRadS),
      magDb: Array.from(fr.magDb),
      phaseDeg: Array.from(fr.phaseDeg),
      crossoversRadS: v.crossoversRadS,
      phaseCrossoversRadS: v.phaseCrossoversRadS,
    });
    if (v.stable) {
      const s = stepResponse(plant, c);
      if (s.tS.length > 1) step.push({ variant: v.variant, tS: Array.from(s.tS), y: Array.from(s.y), u: Array.from(s.u), finalValue: v.finalValue });
    }
  }
  return { bode, step };
}
