import type { Complex, TransferFunction } from '../model/tf.js';
import type { Factored } from './factors.js';
import { polyAdd, polyDegree } from './poly.js';
import { classifyPoles, closedLoopPoles, delayClosedLoopPoles, rhpZeroCount } from './stability.js';

/** Opens the warning of a loop whose closed loop does not exist (1 + L(inf) = 0): stores report it as an error. */
export const ILL_POSED_WARNING = 'ill-posed loop';

/** The stability verdict of a loop, its closed-loop poles (approximate with a delay) and what to warn about. */
export interface StabilityVerdict {
  readonly stable: boolean;
  readonly poles: Complex[];
  readonly warnings: string[];
}

/** Sorted for display: rightmost (least damped) first, upper half-plane member of a pair first. */
function sortPoles(ps: Complex[]): Complex[] {
  return ps.sort((a, b) => b.re - a.re || b.im - a.im);
}

/** Decides stability on the closed loop: poles without delay, the encirclement count with one. */
export function loopStability(loop: TransferFunction, f: Factored, gainCrossoversRadS: readonly number[]): StabilityVerdict {
  const warnings: string[] = [];
  const degD = polyDegree(loop.den);
  const degN = polyDegree(loop.num);
  const charDeg = polyDegree(polyAdd(loop.den, loop.num));
  if (loop.delayS === 0) {
    if (charDeg < Math.max(degD, degN)) {
      warnings.push(`${ILL_POSED_WARNING}: 1 + L(inf) = 0 (the closed loop is improper)`);
      return { stable: false, poles: charDeg >= 0 ? sortPoles(closedLoopPoles(loop)) : [], warnings };
    }
    const poles = sortPoles(closedLoopPoles(loop));
    const c = classifyPoles(poles);
    if (c === 'marginal') warnings.push('closed-loop pole on the imaginary axis: marginally stable, counted as not stable');
    return { stable: c === 'stable', poles, warnings };
  }
  const poles = sortPoles(delayClosedLoopPoles(loop));
  warnings.push('closed-loop poles approximate (delay): a finite subset of infinitely many, each refined on the exact characteristic equation');
  if (degN > degD) {
    warnings.push('improper loop with a delay: infinitely many closed-loop poles in the right half-plane');
    return { stable: false, poles, warnings };
  }
  if (degN === degD && Math.abs(f.gain) >= 1) {
    warnings.push('|L(inf)| >= 1 with a delay: the closed loop has poles on or right of the imaginary axis at high frequency');
    return { stable: false, poles, warnings };
  }
  if ((loop.den[0] ?? 0) + (loop.num[0] ?? 0) === 0) {
    warnings.push('closed-loop pole at s = 0: marginally stable, counted as not stable');
    return { stable: false, poles, warnings };
  }
  const z = rhpZeroCount(loop, f, gainCrossoversRadS);
  if (!z.reliable) {
    warnings.push('stability uncertain: a closed-loop pole lies on or very near the imaginary axis; counted as not stable');
    return { stable: false, poles, warnings };
  }
  return { stable: z.count === 0, poles, warnings };
}
