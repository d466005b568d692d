import { Cascade, type CascadeLoop } from '../../engine/cascade.js';
import type { Machine } from '../../engine/index.js';
import type { LoopState } from '../../engine/types.js';
import type { PlantVariant } from '../../design/propose.js';

/** What `tune` needs of a stored loop: its state at the head revision and the plants it controls. */
export interface StoredLoop {
  readonly revision: number;
  readonly state: LoopState;
  /** Effective plants, default variant first: behind the closed inner loop for an outer loop, as `check` sees them. */
  readonly plants: readonly PlantVariant[];
  readonly warnings: readonly string[];
  /** Closed-loop bandwidth of the inner loop's default variant, for `sep` requirements; null without one. */
  readonly innerBandwidthRadS: number | null;
}

/**
 * Reads a loop through the engine. The plants an outer loop controls are formed by
 * the engine's own cascade code (the inner loop closed around its plant), fed from
 * the engine's public reads, so a design sees exactly what `check` checks.
 */
export async function readStoredLoop(m: Machine, ref: string): Promise<StoredLoop> {
  const info = m.loopInfo(ref);
  const ids = new Map<string, number>();
  const refs: string[] = [];
  const idOf = (r: string): number => {
    let id = ids.get(r);
    if (id === undefined) {
      id = refs.length;
      ids.set(r, id);
      refs.push(r);
    }
    return id;
  };
  const states = new Map<string, LoopState>();
  const head = m.revision(ref);
  states.set(info.ref, head.state);
  const load = (id: number): CascadeLoop => {
    const r = refs[id]!;
    let state = states.get(r);
    if (state === undefined) {
      state = m.revision(r).state;
      states.set(r, state);
    }
    const inner = m.loopInfo(r).inner;
    return { ref: r, state, innerId: inner === null ? null : idOf(inner) };
  };
  const cascade = new Cascade(load);
  const id = idOf(info.ref);
  const plants: PlantVariant[] = [];
  const warnings: string[] = [];
  for (const v of cascade.variants(id)) {
    const p = cascade.plant(id, v);
    plants.push({ name: v, tf: p.tf });
    for (const w of p.warnings) if (!warnings.includes(w)) warnings.push(w);
  }
  let innerBandwidthRadS: number | null = null;
  if (info.inner !== null) {
    const d = await m.loopDetail(info.inner);
    innerBandwidthRadS = d.result.variants[0]?.metrics?.bandwidthRadS ?? null;
  }
  return { revision: head.number, state: head.state, plants, warnings, innerBandwidthRadS };
}
