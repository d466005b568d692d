import { frequencyRangeRadS, frequencyResponse, loopGridRadS } from '../analysis/freq.js';
import { factorTf } from '../analysis/factors.js';
import { stepResponse } from '../analysis/step.js';
import { tfSeries } from '../analysis/tf.js';
import { compensatorTf } from '../design/blocks-tf.js';
import type { EffectivePlantsOptions, LoopResult, Machine } from '../engine/index.js';
import type { Compensator } from '../model/blocks.js';
import type { BodeVM, StepVM } from './view-model.js';

/**
 * The curves the loop view draws: the open-loop frequency response and the
 * closed-loop step of each variant, computed by the analysis core on the plant
 * the loop really sees (behind its closed inner loops, as the engine forms it).
 */

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

/**
 * Open-loop Bode data and step response of each variant with compensator `comp`,
 * on the loop's plants at its latest revision, or at `at` (a saved revision or a draft state).
 */
export async function loopCurves(m: Machine, ref: string, comp: Compensator, variants: readonly CurveVariant[], at?: EffectivePlantsOptions): Promise<{ bode: BodeVM[]; step: StepVM[] }> {
  const plants = await m.effectivePlants(ref, at);
  const c = compensatorTf(comp);
  const bode: BodeVM[] = [];
  const step: StepVM[] = [];
  for (const v of variants) {
    // A variant these plants lack (added after an old revision) is the loop's default one, as the engine resolves it.
    const plant = (plants.variants.find((p) => p.variant === v.variant) ?? plants.variants[0]!).tf;
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
