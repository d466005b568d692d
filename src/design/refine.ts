import type { Block } from '../model/blocks.js';
import { gainCrossoversRadS } from '../analysis/crossovers.js';
import { phaseMarginsDeg } from '../analysis/margins.js';
import { brentRoot } from '../analysis/scalar.js';
import { withBlocks } from './shape.js';
import type { DesignVariant } from './types.js';

/** How close the refined phase margin must come to its target (deg). */
export const PM_TOLERANCE_DEG = 0.05;

/**
 * Designs aim this far above the stated margin so that rounding in the last digit
 * never turns "exactly the target" into a miss of a `pm >=` requirement.
 */
export const AIM_ABOVE_DEG = 0.02;

/**
 * The worst phase margin over every gain crossover of every variant when `blocks` are
 * added to each, signed (a negative margin counts as worse than any positive one, so
 * refinement never settles on the wrong side of -1); Infinity without a crossover.
 * Crossovers are found as the analysis core finds them.
 */
export function worstPmOver(variants: readonly DesignVariant[], blocks: readonly Block[]): number {
  let worst = Infinity;
  for (const v of variants) {
    const l = withBlocks(v, blocks);
    const pms = phaseMarginsDeg(l.shape, gainCrossoversRadS(l.tf, l.shape, null));
    for (const pm of pms) worst = Math.min(worst, pm);
  }
  return worst;
}

/** Result of a one-parameter refinement. */
export interface RefineResult {
  /** The parameter chosen. */
  readonly x: number;
  readonly pmDeg: number;
  /** True when pmDeg >= target. */
  readonly reached: boolean;
  /** True when pmDeg equals the target within PM_TOLERANCE_DEG. */
  readonly exact: boolean;
}

/**
 * Finds the parameter x at which pmOf(x) equals targetDeg (aiming AIM_ABOVE_DEG above it). The grid brackets the
 * crossing; Brent's method refines it. 'first' takes the smallest x where the margin
 * rises through the target (least lead), 'last' the largest x where it falls through
 * it (highest crossover). When the whole grid meets the target, the end that asks the
 * least is returned; when none does, the x with the largest margin (reached = false).
 */
export function refineParameter(pmOf: (x: number) => number, grid: readonly number[], targetDeg: number, pick: 'first' | 'last'): RefineResult {
  const vals = grid.map((x) => {
    const v = pmOf(x);
    return Number.isNaN(v) ? -Infinity : v;
  });
  const aim = targetDeg + AIM_ABOVE_DEG;
  const d = vals.map((v) => v - aim);
  const result = (x: number, pm: number): RefineResult => ({
    x,
    pmDeg: pm,
    reached: pm >= targetDeg,
    exact: Math.abs(pm - targetDeg) <= PM_TOLERANCE_DEG,
  });
  let bracket = -1;
  if (pick === 'first') {
    if (d[0]! >= 0) return result(grid[0]!, vals[0]!);
    bracket = d.findIndex((di, i) => i + 1 < d.length && di < 0 && d[i + 1]! >= 0);
  } else {
    const n = d.length;
    if (d[n - 1]! >= 0) return result(grid[n - 1]!, vals[n - 1]!);
    for (let i = n - 2; i >= 0; i--) {
      if (d[i]! >= 0 && d[i + 1]! < 0) { bracket = i; break; }
    }
  }
  if (bracket < 0) {
    let best = 0;
    for (let i = 1; i < vals.length; i++) if (vals[i]! > vals[best]!) best = i;
    return result(grid[best]!, vals[best]!);
  }
  const x = brentRoot((t) => pmOf(t) - aim, grid[bracket]!, grid[bracket + 1]!, 1e-12);
  const pm = pmOf(x);
  // A jump (a crossover appearing) can masquerade as a root: then keep the side that meets the target.
  if (Math.abs(pm - aim) > PM_TOLERANCE_DEG) {
    const side = pick === 'first' ? bracket + 1 : bracket;
    return result(grid[side]!, vals[side]!);
  }
  return result(x, pm);
}

/** n points from a to b, evenly spaced (linear) or log-spaced. */
export function gridBetween(a: number, b: number, n: number, log = false): number[] {
  return Array.from({ length: n }, (_, i) => {
    const t = n === 1 ? 0 : i / (n - 1);
    return log ? a * (b / a) ** t : a + (b - a) * t;
  });
}
