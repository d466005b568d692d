import type { Block } from '../model/blocks.js';
import type { LoopMetrics } from '../model/metrics.js';
import type { Requirement } from '../model/requirements.js';
import type { TransferFunction } from '../model/tf.js';
import { UserError } from '../model/errors.js';
import { analyseLoop } from '../analysis/loop.js';
import { evaluateRequirement, type RequirementOutcome } from '../analysis/requirements.js';
import { compensatorHfGain, compensatorTf } from './blocks-tf.js';

/** A plant variant by name. */
export interface PlantVariant {
  readonly name: string;
  readonly tf: TransferFunction;
}

/** One requirement's outcome on one variant. */
export interface JudgedRequirement extends RequirementOutcome {
  readonly requirement: Requirement;
}

/** The predicted behaviour of a proposal on one variant. */
export interface VariantPrediction {
  readonly variant: string;
  /** Null when the loop could not be analysed (`error` says why). */
  readonly metrics: LoopMetrics | null;
  readonly error?: string;
  readonly outcomes: readonly JudgedRequirement[];
}

/** Context a requirement may need beyond the loop itself. */
export interface VerifyContext {
  readonly innerBandwidthRadS: number | null;
  readonly ideal: boolean;
}

/** Analyses the compensator on every variant through the analysis core and judges every requirement there. */
export function verifyBlocks(blocks: readonly Block[], variants: readonly PlantVariant[], reqs: readonly Requirement[], ctx: VerifyContext): VariantPrediction[] {
  const comp = compensatorTf({ blocks });
  const reqCtx = { compHfGain: compensatorHfGain({ blocks }), innerBandwidthRadS: ctx.innerBandwidthRadS };
  return variants.map((v) => {
    let metrics: LoopMetrics;
    try {
      metrics = analyseLoop(v.tf, comp, { ideal: ctx.ideal });
    } catch (e) {
      if (e instanceof UserError) return { variant: v.name, metrics: null, error: e.message, outcomes: [] };
      throw e;
    }
    return { variant: v.name, metrics, outcomes: reqs.map((r) => ({ requirement: r, ...evaluateRequirement(r, metrics, reqCtx) })) };
  });
}

/** True when every variant was analysed, is stable, and meets every requirement. */
export function allPass(preds: readonly VariantPrediction[]): boolean {
  return preds.every((p) => p.metrics !== null && p.metrics.stable && p.outcomes.every((o) => o.pass));
}

/** A one-line summary of what a prediction misses ("" when it misses nothing). */
export function missSummary(preds: readonly VariantPrediction[]): string {
  const parts: string[] = [];
  for (const p of preds) {
    if (p.metrics === null) parts.push(`${p.variant}: cannot be analysed (${p.error ?? 'unknown'})`);
    else if (!p.metrics.stable) parts.push(`${p.variant}: closed loop UNSTABLE`);
    else {
      const miss = p.outcomes.filter((o) => !o.pass).map((o) => o.requirement.text);
      if (miss.length > 0) parts.push(`${p.variant}: misses ${miss.join(', ')}`);
    }
  }
  return parts.join('; ');
}
