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
import { checkOptions, fcFromRequirements, gmFromRequirements, keptByRedesign, needPm, resolveTargets, type ResolvedTargets, type TuneMethod, type TuneOptions } from './tune-options.js';
import type { DesignOutcome, DesignVariant } from './types.js';
import { magnitudeCrossingsRadS } from './shape.js';
import { makeDesignVariant } from './variants.js';
import { worstPmOver } from './refine.js';
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
 * lead, lag, leadlag, pid: design a new compensator; existing integral action and
 * filters are kept in the loop they design for, gains and dynamic blocks are replaced
 * (see keptByRedesign). notch: new notches for the plant's resonances replace the
 * existing notches. lowpass: adds to the existing compensator.
 * Throws UserError when a needed target is missing or an option is out of range.
 */
export function propose(method: TuneMethod, plants: readonly PlantVariant[], existing: readonly Block[], requirements: readonly Requirement[], options: TuneOptions = {}): Proposal {
  if (plants.length === 0) throw new UserError('tune: the loop has no plant variant to design for');
  checkOptions(options);
  const t = resolveTargets(requirements, options);
  const addOn = method === 'notch' || method === 'lowpass';
  const keep = keptByRedesign(method);
  const kept = existing.filter(keep);
  const replaced = existing.filter((b) => !keep(b));
  const variants = plants.map((p) => makeDesignVariant(p.name, p.tf, kept));
  const assemble = (designed: readonly Block[]): Block[] => (addOn ? [...kept, ...designed] : mergeBlocks(designed, kept));
  const ctx = { method, plants, existing, kept, replaced, t, options, variants, assemble, ideal: addOn && options.ideal === true };
  let p = bestOverVariants(ctx);
  // Peak sensitivity and overshoot follow the phase margin: while only they (and the like)
  // are missed, design again for a margin 5 deg higher, judged on the same requirements.
  for (let boost = 5; !p.ok && t.pmDeg !== null && method !== 'notch' && boost <= 20 && t.pmDeg + boost < 85 && missesShapeOnly(p); boost += 5) {
    const q = bestOverVariants({ ...ctx, t: { ...t, pmDeg: t.pmDeg + boost } });
    if (q.ok) return { ...q, message: `${q.message} (designed for a ${t.pmDeg + boost} deg phase margin to meet ${shapeMisses(p).join(', ')})` };
    if (missCount(q) < missCount(p)) p = q;
  }
  return p;
}

/** The requirements that a higher phase margin helps with. */
const SHAPE_METRICS = new Set(['ms', 'mt', 'os']);

function shapeMisses(p: Proposal): string[] {
  const out = new Set<string>();
  for (const v of p.perVariant) for (const o of v.outcomes) if (!o.pass && SHAPE_METRICS.has(o.requirement.metric)) out.add(o.requirement.text);
  return [...out];
}

/** True when a stable proposal misses only peak-sensitivity/overshoot-type requirements. */
function missesShapeOnly(p: Proposal): boolean {
  if (p.blocks.length === 0) return false;
  return p.perVariant.every((v) => v.metrics !== null && v.metrics.stable && v.outcomes.every((o) => o.pass || SHAPE_METRICS.has(o.requirement.metric)));
}

/**
 * The hand procedures read one variant's plot; unless told which, each variant is tried
 * in turn and the first design that meets every requirement on every variant is kept
 * (else the one that misses least).
 */
function bestOverVariants(c: ProposeContext): Proposal {
  const named = c.options.designVariant ?? null;
  // The hand procedures read one plot: read the variant that is worst today (smallest phase
  // margin with the present compensator) first, since that is the one the design must lift.
  const order = named === null ? worstFirst(c) : [designIndex(c.plants, named)];
  let best: { p: Proposal; score: number } | null = null;
  for (const di of order) {
    const p = finish(c, di);
    if (p.ok) return order.length > 1 && di !== order[0] ? { ...p, message: `${p.message} (designed on variant ${c.plants[di]!.name}; designs on the variants tried before it missed)` } : p;
    const score = missCount(p);
    if (best === null || score < best.score) best = { p, score };
  }
  return best!.p;
}

/** Variant indices ordered by their phase margin under the present compensator, smallest first. */
function worstFirst(c: ProposeContext): number[] {
  const present = c.plants.map((p, i) => ({ i, pm: worstPmOver([makeDesignVariant(p.name, p.tf)], c.existing) }));
  return present.sort((a, b) => a.pm - b.pm || a.i - b.i).map((x) => x.i);
}

interface ProposeContext {
  readonly method: TuneMethod;
  readonly plants: readonly PlantVariant[];
  readonly existing: readonly Block[];
  readonly kept: readonly Block[];
  readonly replaced: readonly Block[];
  readonly t: ResolvedTargets;
  readonly options: TuneOptions;
  readonly variants: readonly DesignVariant[];
  readonly assemble: (designed: readonly Block[]) => Block[];
  readonly ideal: boolean;
}

/** Runs the method with one design variant and verifies the result on every variant. */
function finish(c: ProposeContext, di: number): Proposal {
  const out = runMethod(c.method, c.variants, di, c.t, c.options, c.existing, c.plants);
  const stage = (x: DesignOutcome['hand']): ProposalStage | null => {
    if (x === null) return null;
    const blocks = c.assemble(x.blocks);
    return { blocks, compExpr: compensatorExpr(blocks), worstPmDeg: x.worstPmDeg };
  };
  const base = { method: c.method, worksheet: out.worksheet, hand: stage(out.hand), refined: stage(out.refined), kept: c.kept, replaced: c.replaced, requirements: c.t.requirements };
  if (out.blocks.length === 0) return { ...base, blocks: [], compExpr: '', perVariant: [], ok: false, message: out.message };
  const blocks = c.assemble(out.blocks);
  const perVariant = verifyBlocks(blocks, c.plants, c.t.requirements, { innerBandwidthRadS: c.options.innerBandwidthRadS ?? null, ideal: c.ideal });
  const pass = allPass(perVariant);
  const verdict = pass ? 'meets every requirement on every variant' : missSummary(perVariant);
  return { ...base, blocks, compExpr: compensatorExpr(blocks), perVariant, ok: out.feasible && pass, message: `${out.message}; ${verdict}` };
}

/** Ranks failed proposals: no blocks worst, then instability, then the number of misses. */
function missCount(p: Proposal): number {
  if (p.blocks.length === 0) return 1e9;
  let n = 0;
  for (const v of p.perVariant) {
    if (v.metrics === null || !v.metrics.stable) n += 1e6;
    n += v.outcomes.filter((o) => !o.pass).length;
  }
  return n;
}

/** Index of the named design variant; an unknown name is refused with the list. */
function designIndex(plants: readonly PlantVariant[], name: string): number {
  const i = plants.findIndex((p) => p.name === name);
  if (i < 0) throw new UserError(`--variant: no plant variant '${name}'; the loop has ${plants.map((p) => p.name).join(', ')}`);
  return i;
}

/** Designed gain first, then kept integral action, the designed dynamic blocks, then kept filters. */
function mergeBlocks(designed: readonly Block[], kept: readonly Block[]): Block[] {
  const integral = (b: Block) => b.kind === 'integrator' || b.kind === 'pi';
  const gains = designed.filter((b) => b.kind === 'gain');
  const rest = designed.filter((b) => b.kind !== 'gain');
  return [...gains, ...kept.filter(integral), ...rest, ...kept.filter((b) => !integral(b))];
}

/** The highest gain crossover of the loop with its present compensator, or null. */
function presentCrossoverRadS(plant: PlantVariant, existing: readonly Block[]): number | null {
  const v = makeDesignVariant(plant.name, plant.tf, existing);
  const ws = magnitudeCrossingsRadS(v.shape, 1);
  return ws.length === 0 ? null : ws[ws.length - 1]!;
}

/** The product of the existing gain blocks: where a design without an error-constant target starts. */
function existingGain(existing: readonly Block[]): number {
  return existing.reduce((k, b) => (b.kind === 'gain' ? k * b.k : k), 1);
}

function runMethod(method: TuneMethod, variants: readonly DesignVariant[], di: number, t: ResolvedTargets, o: TuneOptions, existing: readonly Block[], plants: readonly PlantVariant[]): DesignOutcome {
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
      return designLeadLag(variants, di, { pmDeg: needPm(t, method), fcRadS: t.fcRadS ?? fcFromRequirements(t.requirements), allowDeg: o.allowDeg ?? 5, maxStagePhaseDeg, stages, zeroRatio: o.lagZeroRatio ?? 10, targets: t.errorConstants, fallbackK });
    case 'pid': {
      const fc = t.fcRadS ?? fcFromRequirements(t.requirements) ?? presentCrossoverRadS(plants[di]!, existing);
      if (fc === null) throw new UserError('tune pid: no crossover to place the controller at (none required, none present); give --fc FREQ or add a requirement fc>=FREQ to the loop');
      return designPid(variants, di, { pmDeg: needPm(t, method), fcRadS: fc, form: o.pidForm ?? 'auto', targets: t.errorConstants });
    }
    case 'notch':
      return designNotch(variants, di, { zetaMax: o.zetaMax ?? 0.15, pmDeg: t.pmDeg, gmDb: gmFromRequirements(t.requirements) ?? 10 });
    case 'lowpass':
      return designLowpass(variants, di, { pmDeg: needPm(t, method), order: o.lowpassOrder ?? 2, existing });
  }
}
