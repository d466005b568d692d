import { analyseLoop } from '../analysis/loop.js';
import { ILL_POSED_WARNING } from '../analysis/stability-verdict.js';
import { evaluateRequirement, loopStatus, type RequirementOutcome, type VariantAnalysis } from '../analysis/requirements.js';
import { compensatorHfGain, compensatorTf } from '../design/blocks-tf.js';
import type { LoopStatus, RequirementResult } from '../model/requirements.js';
import type { FreqUnit } from '../model/units.js';
import { formatMetricValue, metricName } from './requirement-syntax.js';
import type { Cascade } from './cascade.js';
import type { LoopResult, VariantResult } from './types.js';

/**
 * The numerics side of a recheck: effective plants, analysis, requirement
 * outcomes, status. Loaded on demand (dynamic import) so that reading fresh
 * stored results never loads the analysis code.
 */

export { Cascade } from './cascade.js';

export interface EvaluateInput {
  readonly id: number;
  readonly ref: string;
  readonly revision: number;
  readonly inputHash: string;
  readonly computedAt: string;
  readonly unit: FreqUnit;
  readonly cascade: Cascade;
  /** Fresh result of the inner loop (for `sep`), null without one. */
  readonly inner: LoopResult | null;
  /** Resolves a variant of this loop to the inner loop's variant name. */
  readonly innerVariant: (variant: string) => string;
}

/** Checks one loop for every variant: stable, and every requirement held. */
export function evaluateLoop(x: EvaluateInput): LoopResult {
  const state = x.cascade.state(x.id);
  const variants: VariantResult[] = [];
  const analyses: VariantAnalysis[] = [];
  const outcomes: RequirementOutcome[] = [];
  let compTf: ReturnType<typeof compensatorTf> | null = null;
  let hfGain = 0;
  let compError: string | null = null;
  try {
    compTf = compensatorTf(state.compensator);
    hfGain = compensatorHfGain(state.compensator);
  } catch (e) {
    compError = message(e);
  }
  for (const variant of x.cascade.variants(x.id)) {
    let warnings: readonly string[] = [];
    try {
      if (compTf === null) throw new Error(`compensator: ${compError}`);
      const plant = x.cascade.plant(x.id, variant);
      const metrics = analyseLoop(plant.tf, compTf, { ideal: state.compensator.ideal === true });
      warnings = [...plant.warnings, ...metrics.warnings];
      // No closed loop exists at all: that is a loop that cannot be analysed, not an unstable one.
      const illPosed = metrics.warnings.find((w) => w.startsWith(ILL_POSED_WARNING));
      if (illPosed !== undefined) throw new Error(illPosed);
      const innerBw = innerBandwidth(x, variant);
      const reqs: RequirementResult[] = state.requirements.map((requirement) => {
        const o = evaluateRequirement(requirement, metrics, { compHfGain: hfGain, innerBandwidthRadS: innerBw.value });
        const reason = requirement.metric === 'sep' && x.inner !== null && innerBw.value === null ? innerBw.reason : o.reason;
        outcomes.push(o);
        return reason === undefined ? { requirement, variant, value: o.value, pass: o.pass } : { requirement, variant, value: o.value, pass: o.pass, reason };
      });
      const analysis: VariantAnalysis = { metrics };
      analyses.push(analysis);
      variants.push({ variant, status: loopStatus([analysis], reqs), metrics, requirements: reqs, warnings });
    } catch (e) {
      const error = message(e);
      analyses.push({ error });
      variants.push({ variant, status: 'error', metrics: null, error, requirements: [], warnings });
    }
  }
  const status = loopStatus(analyses, outcomes);
  const failures = variants.flatMap((v) => v.requirements.filter((r) => !r.pass));
  return { loop: x.ref, revision: x.revision, status, summary: summarise(status, variants, failures, x.unit), variants, failures, inputHash: x.inputHash, computedAt: x.computedAt };
}

function innerBandwidth(x: EvaluateInput, variant: string): { value: number | null; reason?: string } {
  if (x.inner === null) return { value: null };
  const name = x.innerVariant(variant);
  const v = x.inner.variants.find((iv) => iv.variant === name);
  if (!v || v.metrics === null) return { value: null, reason: `inner loop ${x.inner.loop} (${name}) could not be analysed` };
  if (v.metrics.bandwidthRadS === null) return { value: null, reason: `inner loop ${x.inner.loop} (${name}) has no bandwidth` };
  return { value: v.metrics.bandwidthRadS };
}

function message(e: unknown): string {
  return e instanceof Error ? e.message : String(e);
}

/** One line for lists: the first problem and how many more. */
function summarise(status: LoopStatus, variants: readonly VariantResult[], failures: readonly RequirementResult[], unit: FreqUnit): string {
  const many = variants.length > 1;
  const tag = (v: string) => (many ? ` (${v})` : '');
  if (status === 'pass') return many ? `pass (${variants.length} variants)` : 'pass';
  if (status === 'error') {
    const v = variants.find((x) => x.status === 'error')!;
    return `error${tag(v.variant)}: ${v.error ?? 'cannot be analysed'}`;
  }
  if (status === 'unstable') {
    const names = variants.filter((v) => v.metrics !== null && !v.metrics.stable).map((v) => v.variant);
    return many ? `unstable closed loop (${names.join(', ')})` : 'unstable closed loop';
  }
  const f = failures[0]!;
  const r = f.requirement;
  const got = f.value === null ? (f.reason ?? 'no value') : formatMetricValue(r.metric, f.value, unit);
  const more = failures.length > 1 ? `; ${failures.length - 1} more` : '';
  return `fail: ${metricName(r.metric)} ${got}, needs ${r.op} ${formatMetricValue(r.metric, r.value, unit)}${tag(f.variant)}${more}`;
}
