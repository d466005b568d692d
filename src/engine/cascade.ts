import { compensatorTf } from '../design/blocks-tf.js';
import { polyAdd, polyMul } from '../analysis/poly.js';
import type { TransferFunction } from '../model/tf.js';
import { formatTime } from '../model/units.js';
import { padeDelay } from './pade.js';
import { defaultVariant, variantOrder } from './state.js';
import type { LoopState } from './types.js';

/** Order of the Pade approximant that stands in for a delayed inner loop inside an outer plant. */
export const INNER_PADE_ORDER = 3;

/** What the cascade needs to know of one loop. */
export interface CascadeLoop {
  readonly ref: string;
  readonly state: LoopState;
  readonly innerId: number | null;
}

/** The plant an outer loop sees for one variant, and how it was formed. */
export interface EffectivePlant {
  readonly tf: TransferFunction;
  readonly warnings: readonly string[];
}

/**
 * T = L/(1+L) of a loop closed with unity negative feedback, times a plant in
 * series: num = Ln Pn, den = (Ld + Ln) Pd. Nothing is cancelled, so the inner
 * loop's closed-loop poles stay visible to the outer loop's stability check.
 * A delay inside the inner loop (plant or compensator) makes T non-rational; it
 * enters as an (n, n) Pade approximant and the caller is told so.
 */
export function closeAndSeries(comp: TransferFunction, innerPlant: TransferFunction, outerPlant: TransferFunction): { tf: TransferFunction; padeOfS: number } {
  const delayS = comp.delayS + innerPlant.delayS;
  let ln = polyMul(comp.num, innerPlant.num);
  let ld = polyMul(comp.den, innerPlant.den);
  if (delayS > 0) {
    const q = padeDelay(delayS, INNER_PADE_ORDER);
    ln = polyMul(ln, q.num);
    ld = polyMul(ld, q.den);
  }
  return {
    tf: { num: polyMul(ln, outerPlant.num), den: polyMul(polyAdd(ld, ln), outerPlant.den), delayS: outerPlant.delayS },
    padeOfS: delayS,
  };
}

/**
 * Effective plants of the loops of one axis. An outer loop's variants are the
 * union of its own and its inner loops' variant names: for a name a loop does
 * not have, that loop uses its default variant, so a "loaded" inner plant is
 * checked inside the outer loop too.
 */
export class Cascade {
  private readonly loops = new Map<number, CascadeLoop>();
  private readonly variantMemo = new Map<number, string[]>();
  private readonly plantMemo = new Map<string, EffectivePlant>();

  /** `load` gives a loop's state and inner loop; it is called at most once per loop. */
  constructor(private readonly load: (id: number) => CascadeLoop) {}

  private get(id: number): CascadeLoop {
    let l = this.loops.get(id);
    if (l === undefined) {
      l = this.load(id);
      this.loops.set(id, l);
    }
    return l;
  }

  /** The state a loop is analysed with. */
  state(id: number): LoopState {
    return this.get(id).state;
  }

  /** Variant names to check for a loop, default first. */
  variants(id: number): string[] {
    let v = this.variantMemo.get(id);
    if (v === undefined) {
      const l = this.get(id);
      const names = Object.keys(l.state.plants);
      v = variantOrder(l.innerId === null ? names : [...names, ...this.variants(l.innerId)]);
      if (v[0] !== defaultVariant(l.state)) v = [defaultVariant(l.state), ...v.filter((x) => x !== defaultVariant(l.state))];
      this.variantMemo.set(id, v);
    }
    return v;
  }

  /** The name a loop uses for a requested variant: that name if it has it (here or inside), else its default. */
  resolve(id: number, variant: string): string {
    return this.variants(id).includes(variant) ? variant : defaultVariant(this.get(id).state);
  }

  /** The plant this loop controls for a variant: its own plant, behind its closed inner loop if it has one. */
  plant(id: number, variant: string): EffectivePlant {
    const key = `${id}|${variant}`;
    let p = this.plantMemo.get(key);
    if (p !== undefined) return p;
    const l = this.get(id);
    const own = l.state.plants[variant in l.state.plants ? variant : defaultVariant(l.state)]!.tf;
    if (l.innerId === null) {
      p = { tf: own, warnings: [] };
    } else {
      const inner = this.get(l.innerId);
      const innerPlant = this.plant(l.innerId, this.resolve(l.innerId, variant));
      const closed = closeAndSeries(compensatorTf(inner.state.compensator), innerPlant.tf, own);
      const warnings = [...innerPlant.warnings];
      if (closed.padeOfS > 0) {
        warnings.push(`inner loop ${inner.ref} has a ${formatTime(closed.padeOfS)} delay; its closed loop enters this plant as a (${INNER_PADE_ORDER},${INNER_PADE_ORDER}) Pade approximant`);
      }
      p = { tf: closed.tf, warnings };
    }
    this.plantMemo.set(key, p);
    return p;
  }
}
