import { loopStatus } from '../analysis/requirements.js';
import { propose } from '../design/propose.js';
import { TUNE_METHODS, type TuneMethod } from '../design/tune-options.js';
import { formatWorksheet } from '../design/worksheet.js';
import type { Machine } from '../engine/index.js';
import { UserError } from '../model/errors.js';
import { checkOf, variantHeadline } from './engine-adapt.js';
import type { ProposalVM, TuneMethodVM } from './view-model.js';

/**
 * The Tune screen's link to the design assistant: the same `propose` the `tune`
 * command runs, on the plants the loop really controls (from the engine's
 * effectivePlants, as the command reads them), so a proposal on screen is the
 * one `loopledger tune` would print.
 */

const LABELS: Record<TuneMethod, string> = {
  lead: 'phase lead: Bode procedure, then refined to the target margin',
  lag: 'phase lag: low-frequency gain at an almost unchanged crossover',
  leadlag: 'lead and lag together',
  pid: 'PID with a derivative filter, placed at a crossover',
  notch: 'notch on a lightly damped resonance (added to the blocks)',
  lowpass: 'low-pass above crossover against noise (added to the blocks)',
};

/** The methods of the design assistant, in its own order. */
export function tuneMethods(): TuneMethodVM[] {
  return TUNE_METHODS.map((key) => ({ key, label: LABELS[key] }));
}

/** Runs one method on a stored loop; a method that cannot design says why instead of throwing. */
export async function proposeFor(m: Machine, ref: string, method: string): Promise<ProposalVM> {
  if (!(TUNE_METHODS as readonly string[]).includes(method)) return { ok: false, error: `unknown method '${method}'` };
  try {
    const loop = await m.effectivePlants(ref);
    const plants = loop.variants.map((v) => ({ name: v.variant, tf: v.tf }));
    const p = propose(method as TuneMethod, plants, loop.state.compensator.blocks, loop.state.requirements, {
      innerBandwidthRadS: loop.innerBandwidthRadS, ideal: loop.state.compensator.ideal === true,
    });
    const variants = p.perVariant.map((v) => ({
      name: v.variant, stable: v.metrics?.stable ?? false, ...(v.error !== undefined ? { error: v.error } : {}), headline: variantHeadline(v.metrics),
    }));
    const status = loopStatus(
      p.perVariant.map((v) => (v.metrics === null ? { error: v.error ?? 'cannot be analysed' } : { metrics: v.metrics })),
      p.perVariant.flatMap((v) => v.outcomes),
    );
    return {
      ok: true, method, baseRevision: loop.revision, meets: p.ok, message: p.message,
      worksheet: [...loop.warnings.map((w) => `warning: ${w}`), ...formatWorksheet(p.worksheet, m.settings().unit)],
      blocks: p.blocks, status, variants,
      checks: p.perVariant.flatMap((v) => v.outcomes.map((o) => checkOf({ ...o, variant: v.variant }))),
    };
  } catch (e) {
    if (e instanceof UserError) return { ok: false, error: e.message };
    throw e;
  }
}

/** The revision note of an applied proposal: the engineer's words, then what the method did and its worksheet. */
export function proposalNote(note: string, p: ProposalVM & { ok: true }): string {
  return [note, '', `tune ${p.method}: ${p.message}`, ...p.worksheet].join('\n');
}
