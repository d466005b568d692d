import { UserError } from '../model/errors.js';
import { checkLoops } from './check.js';
import { axisGraph, findLoop, type Core } from './core.js';
import { loadEvaluator } from './recheck.js';
import { decodeState } from './state.js';
import type { EffectivePlants, EffectivePlantsOptions, LoopResult, LoopState, VariantPlant } from './types.js';

/**
 * The plants a loop really controls, formed by the same cascade code `check`
 * uses: an outer loop's plant is its own plant behind its closed inner loop.
 * For design (tune) and for drawing curves, so neither has to rebuild the
 * cascade from public reads.
 */

/** Bandwidth of the inner loop's variant `name` in its fresh result, or null. */
function bandwidthOf(inner: LoopResult | null, name: string | null): number | null {
  if (inner === null || name === null) return null;
  return inner.variants.find((v) => v.variant === name)?.metrics?.bandwidthRadS ?? null;
}

/** Effective plants of every variant of a loop, at its latest state, a saved revision, or a draft state. */
export async function effectivePlants(core: Core, ref: string, opts: EffectivePlantsOptions = {}): Promise<EffectivePlants> {
  if (opts.revision !== undefined && opts.state !== undefined) throw new Error('effectivePlants: give a revision or a state, not both');
  const ev = await loadEvaluator();
  const loop = findLoop(core, ref);
  // The inner loop's fresh result (analysed and stored first if stale): `sep` needs its bandwidth.
  const innerRef = loop.inner_loop_id === null ? null : axisGraph(core, loop.axis_id).ref(loop.inner_loop_id);
  const inner = innerRef === null ? null : (await checkLoops(core, [innerRef])).loops[0]!;
  return core.sql.db.transaction((): EffectivePlants => {
    const graph = axisGraph(core, loop.axis_id);
    const headState = (id: number): LoopState => decodeState(core.sql.revision(id, graph.head(id).number)!.state_json);
    let revision = graph.head(loop.id).number;
    let state: LoopState;
    if (opts.state !== undefined) state = opts.state;
    else if (opts.revision !== undefined) {
      const row = core.sql.revision(loop.id, opts.revision);
      if (!row) throw new UserError(`${ref} has no revision ${opts.revision}; its revisions are 1 to ${revision}`);
      revision = row.number;
      state = decodeState(row.state_json);
    } else state = headState(loop.id);
    const cascade = new ev.Cascade((id) => ({ ref: graph.ref(id), state: id === loop.id ? state : headState(id), innerId: graph.loop(id).inner_loop_id }));
    const innerId = loop.inner_loop_id;
    const warnings: string[] = [];
    const variants = cascade.variants(loop.id).map((variant): VariantPlant => {
      const p = cascade.plant(loop.id, variant);
      for (const w of p.warnings) if (!warnings.includes(w)) warnings.push(w);
      const innerVariant = innerId === null ? null : cascade.resolve(innerId, variant);
      return { variant, tf: p.tf, warnings: p.warnings, innerVariant, innerBandwidthRadS: bandwidthOf(inner, innerVariant) };
    });
    return {
      loop: graph.ref(loop.id), revision, state, variants, warnings,
      inner: innerRef, innerBandwidthRadS: variants[0]?.innerBandwidthRadS ?? null,
    };
  }).deferred();
}
