import type { Block } from '../model/blocks.js';
import { UserError } from '../model/errors.js';
import type { Requirement } from '../model/requirements.js';
import { compensatorExpr } from './comp-expr.js';
import { designLag } from './lag.js';
import { designLeadBode } from './lead.js';
import { designLeadAtCrossover } from './lead-fc.js';
import { designLeadLag } from './leadlag.js';
import { designLowpass } from './lowpass.js';
import { designNotch } from './notch.js';
import { designPid } from './pid.js';
import { checkOptions, fcFromRequirements, isKeptByRedesign, needPm, resolveTargets, type ResolvedTargets, type TuneMethod, type TuneOptions } from './tune-options.js';
import type { DesignOutcome, DesignVariant } from './types.js';
import { makeDesignVariant } from './variants.js';
import { allPass, missSummary, verifyBlocks, type PlantVariant, type VariantPrediction } from './verify.js';
import type { WorksheetStep } from './worksheet.js';

export type { TuneMethod, TuneOptions } from './tune-options.js';
export type { PlantVariant, VariantPrediction, JudgedRequirement } from './verify.js';
export type { WorksheetStep } from './worksheet.js';

/** A design stage shown to the engineer: the whole compensator and the worst-variant phase margin of the procedure. */
export interface ProposalStage {
  readonly blocks: readonly Block[];
  readonly compExpr: string;
  readonly worstPmDeg: number;
}

/** What `propose` returns: the compensator, how it came to be, and how it does on every variant. */
export interface Proposal {
  readonly method: TuneMethod;
  /** The whole proposed compensator, in order (empty when the procedure produced none). */
  readonly blocks: readonly Block[];
  /** The same as an expression in s ('' when there are no blocks). */
  readonly compExpr: string;
  readonly worksheet: readonly WorksheetStep[];
  /** The hand procedure's compensator, when the method has one. */
  readonly hand: ProposalStage | null;
  /** The refined compensator, when the method refines. */
  readonly refined: ProposalStage | null;
  /** Existing blocks carried over unchanged, and those the design replaced. */
  readonly kept: readonly Block[];
  readonly replaced: readonly Block[];
  /** The requirements the proposal is judged on (the loop's plus stated targets). */
  readonly requirements: readonly Requirement[];
  /** Predicted metrics and requirement outcomes per variant (analysis core). */
  readonly perVariant: readonly VariantPrediction[];
  /** True only when every variant is stable and meets every requirement. */
  readonly ok: boolean;
  readonly message: string;
}

/**
 * Proposes a compensator for a loop by a classic frequency-response method and
 * verifies it on every plant variant against every requirement.
 *
 * lead, lag, leadlag, pid: design a new compensator; existing integrators, notches
 * and low-pass blocks are kept in the loop they design for, gains and dynamic blocks
 * are replaced. notch, lowpass: add to the existing compensator.
 * Throws UserError when a needed target is missing or an option is out of range.
 */
export function propose(method: TuneMethod, plants: readonly PlantVariant[], existing: readonly Block[], requirements: readonly Requirement[], options: TuneOptions = {}): Proposal {
  if (plants.length === 0) throw new UserError('tune: the loop has no plant variant to design for');
  checkOptions(options);
  const t = resolveTargets(requirements, options);
  const addOn = method === 'notch' || method === 'lowpass';
  const kept = addOn ? [...existing] : existing.filter(isKeptByRedesign);
  const replaced = addOn ? [] : existing.filter((b) => !isKeptByRedesign(b));
  const variants = plants.map((p) => makeDesignVariant(p.name, p.tf, kept));
  const di = designIndex(plants, options.designVariant ?? null);
  const out = runMethod(method, variants, di, t, options, existing);
  const assemble = (designed: readonly Block[]): Block[] => (addOn ? [...kept, ...designed] : mergeBlocks(designed, kept));
  const stage = (c: DesignOutcome['hand']): ProposalStage | null => {
    if (c === null) return null;
    const blocks = assemble(c.blocks);
    return { blocks, compExpr: compensatorExpr(blocks), worstPmDeg: c.worstPmDeg };
  };
  const base = { method, worksheet: out.worksheet, hand: stage(out.hand), refined: stage(out.refined), kept, replaced, requirements: t.requirements };
  if (out.blocks.length === 0) {
    return { ...base, blocks: [], compExpr: '', perVariant: [], ok: false, message: out.message };
  }
  const blocks = assemble(out.blocks);
  const ideal = addOn && options.ideal === true;
  const perVariant = verifyBlocks(blocks, plants, t.requirements, { innerBandwidthRadS: options.innerBandwidthRadS ?? null, ideal });
  const pass = allPass(perVariant);
  const ok = out.feasible && pass;
  const verdict = pass ? 'meets every requirement on every variant' : missSummary(perVariant);
  return { ...base, blocks, compExpr: compensatorExpr(blocks), perVariant, ok, message: `${out.message}; ${verdict}` };
}

/** Index of the named design variant (default the first); an unknown name is refused with the list. */
function designIndex(plants: readonly PlantVariant[], name: string | null): number {
  if (name === null) return 0;
  const i = plants.findIndex((p) => p.name === name);
  if (i < 0) throw new UserError(`--variant: no plant variant '${name}'; the loop has ${plants.map((p) => p.name).join(', ')}`);
  return i;
}

/** Designed gain first, then kept integrators, the designed dynamic blocks, then kept filters. */
function mergeBlocks(designed: readonly Block[], kept: readonly Block[]): Block[] {
  const gains = designed.filter((b) => b.kind === 'gain');
  const rest = designed.filter((b) => b.kind !== 'gain');
  const ints = kept.filter((b) => b.kind === 'integrator');
  const filters = kept.filter((b) => b.kind !== 'integrator');
  return [...gains, ...ints, ...rest, ...filters];
}

/** The product of the existing gain blocks: where a design without an error-constant target starts. */
function existingGain(existing: readonly Block[]): number {
  return existing.reduce((k, b) => (b.kind === 'gain' ? k * b.k : k), 1);
}

function runMethod(method: TuneMethod, variants: DesignVariant[], di: number, t: ResolvedTargets, o: TuneOptions, existing: readonly Block[]): DesignOutcome {
  const maxStagePhaseDeg = o.maxStagePhaseDeg ?? 60;
  const stages = o.stages ?? null;
  const fallbackK = existingGain(existing);
  switch (method) {
    case 'lead':
      if (t.fcRadS !== null) return designLeadAtCrossover(variants, di, { pmDeg: needPm(t, method), fcRadS: t.fcRadS, maxStagePhaseDeg, stages, targets: t.errorConstants });
      return designLeadBode(variants, di, { pmDeg: needPm(t, method), allowDeg: o.allowDeg ?? 5, maxStagePhaseDeg, stages, targets: t.errorConstants, fallbackK });
    case 'lag':
      return designLag(variants, di, { pmDeg: needPm(t, method), allowDeg: o.allowDeg ?? 10, zeroRatio: o.lagZeroRatio ?? 10, targets: t.errorConstants, fallbackK });
    case 'leadlag':
      return designLeadLag(variants, di, { pmDeg: needPm(t, method), fcRadS: t.fcRadS, allowDeg: o.allowDeg ?? 5, maxStagePhaseDeg, stages, zeroRatio: o.lagZeroRatio ?? 10, targets: t.errorConstants, fallbackK });
    case 'pid': {
      const fc = t.fcRadS ?? fcFromRequirements(t.requirements);
      if (fc === null) throw new UserError('tune pid: no crossover to place the controller at; give --fc FREQ or add a requirement fc>=FREQ to the loop');
      return designPid(variants, di, { pmDeg: needPm(t, method), fcRadS: fc, form: o.pidForm ?? 'auto', targets: t.errorConstants });
    }
    case 'notch':
      return designNotch(variants, di, { zetaMax: o.zetaMax ?? 0.15, pmDeg: t.pmDeg });
    case 'lowpass':
      return designLowpass(variants, di, { pmDeg: needPm(t, method), order: o.lowpassOrder ?? 2, existing });
  }
}
