import type { LoopMetrics } from '../model/metrics.js';
import type { LoopStatus, Requirement } from '../model/requirements.js';

/** What a requirement needs beyond the loop's own metrics. */
export interface RequirementContext {
  /** |C(j inf)| of the compensator. */
  readonly compHfGain: number;
  /** Closed-loop bandwidth of the inner loop, for `sep`; null when there is no inner loop. */
  readonly innerBandwidthRadS: number | null;
}

export interface RequirementOutcome {
  readonly value: number | null;
  readonly pass: boolean;
  readonly reason?: string;
}

/**
 * The value a requirement is judged on, in base units, or a reason it has none.
 * pm: the smallest |PM| over all gain crossovers (Infinity with no crossover);
 * gm: |GM| of the reported margin (Infinity with no phase crossover);
 * fc: the highest gain crossover (where |L| finally drops below 1).
 */
export function requirementValue(req: Requirement, m: LoopMetrics, ctx: RequirementContext): { value: number | null; reason?: string } {
  const step = m.step;
  const needStep = (v: number | null | undefined) =>
    step === null ? { value: null, reason: m.stable ? 'no step response (improper loop or zero final value)' : 'no step response: closed loop unstable' } : v === null || v === undefined ? { value: null, reason: 'not reached within the simulated time' } : { value: v };
  switch (req.metric) {
    case 'pm':
      return { value: m.phaseMarginsDeg.length === 0 ? Infinity : Math.min(...m.phaseMarginsDeg.map(Math.abs)) };
    case 'gm':
      return { value: m.gainMarginDb === null ? Infinity : Math.abs(m.gainMarginDb) };
    case 'fc':
      return m.gainCrossoversRadS.length === 0 ? { value: null, reason: 'no gain crossover (|L| never crosses 1)' } : { value: Math.max(...m.gainCrossoversRadS) };
    case 'bw':
      return m.bandwidthRadS === null ? { value: null, reason: '|T| never drops 3 dB below its DC value' } : { value: m.bandwidthRadS };
    case 'ms': return { value: m.peakSensitivity };
    case 'mt': return { value: m.peakComplementary };
    case 'dm':
      return m.delayMarginS === null ? { value: Infinity } : { value: m.delayMarginS };
    case 'os': return needStep(step?.overshootPct);
    case 'tr': return needStep(step?.riseTimeS);
    case 'ts': return needStep(step?.settlingTimeS);
    case 'effort': return needStep(step?.peakEffort);
    case 'kp': return { value: m.kp };
    case 'kv': return { value: m.kv };
    case 'ka': return { value: m.ka };
    case 'hf': return { value: ctx.compHfGain };
    case 'sep':
      if (ctx.innerBandwidthRadS === null) return { value: null, reason: 'the loop has no inner loop to be separated from' };
      if (m.bandwidthRadS === null) return { value: null, reason: 'this loop has no bandwidth' };
      return { value: ctx.innerBandwidthRadS / m.bandwidthRadS };
  }
}

/**
 * Judges one requirement on one variant's metrics. Margin-type requirements hold
 * only when the closed loop is stable: a margin of an unstable loop means nothing.
 */
export function evaluateRequirement(req: Requirement, m: LoopMetrics, ctx: RequirementContext): RequirementOutcome {
  const { value, reason } = requirementValue(req, m, ctx);
  if (value === null) return { value, pass: false, reason: reason ?? 'cannot be computed' };
  if (!m.stable && STABILITY_BOUND.has(req.metric)) return { value, pass: false, reason: 'closed loop unstable' };
  const pass = req.op === '>=' ? value >= req.value : value <= req.value;
  return { value, pass };
}

const STABILITY_BOUND = new Set(['pm', 'gm', 'dm', 'ms', 'mt', 'bw', 'fc', 'sep']);

/** One variant's analysis: its metrics, or why it could not be analysed. */
export type VariantAnalysis = { readonly metrics: LoopMetrics } | { readonly error: string };

/** Loop status over all variants: error beats unstable beats fail beats pass. */
export function loopStatus(variants: readonly VariantAnalysis[], outcomes: readonly RequirementOutcome[]): LoopStatus {
  if (variants.some((v) => 'error' in v)) return 'error';
  if (variants.some((v) => 'metrics' in v && !v.metrics.stable)) return 'unstable';
  return outcomes.every((o) => o.pass) ? 'pass' : 'fail';
}
