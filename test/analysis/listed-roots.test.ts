import { describe, expect, it } from 'vitest';
import { benchDump } from '../../bench/store-bench.js';
import { analyseLoop } from '../../src/analysis/loop.js';
import { delayClosedLoopPoles } from '../../src/analysis/stability.js';
import { compensatorTf } from '../../src/design/blocks-tf.js';
import { parseCanonical } from '../../src/engine/canonical-json.js';
import { Cascade } from '../../src/engine/cascade.js';
import type { MachineDump } from '../../src/engine/dump.js';
import type { TransferFunction } from '../../src/model/tf.js';

/**
 * What the analysis lists must really be there, whatever rounding noise the root
 * finder leaves: a listed phase crossover is a frequency where angle L = -180 deg,
 * and a closed-loop pole hidden by a pole-zero cancellation is still listed.
 */

/** p(jw) by plain complex Horner on the unscaled coefficients: a check independent of the factored form. */
function atJw(p: readonly number[], w: number): [number, number] {
  let re = 0;
  let im = 0;
  for (let k = p.length - 1; k >= 0; k--) [re, im] = [re * 0 - im * w + p[k]!, re * w + im * 0];
  return [re, im];
}

/** Distance of angle L(jw) from -180 deg (mod 360), in rad. */
function offMinus180(l: TransferFunction, w: number): number {
  const [nr, ni] = atJw(l.num, w);
  const [dr, di] = atJw(l.den, w);
  const a = Math.atan2(ni, nr) - Math.atan2(di, dr) - w * l.delayS + Math.PI;
  return Math.abs(a - 2 * Math.PI * Math.round(a / (2 * Math.PI)));
}

/** The loops of the bench machine (current, velocity, position cascades and a delayed tension loop) as plant and compensator. */
function benchLoops(axes: number): { ref: string; plant: TransferFunction; comp: TransferFunction }[] {
  const d = parseCanonical<MachineDump>(benchDump(axes));
  return d.axes.flatMap((a) => {
    const names = a.loops.map((l) => l.name);
    const cascade = new Cascade((id) => {
      const l = a.loops[id]!;
      return { ref: l.name, state: l.revisions[0]!.state, innerId: l.inner === null ? null : names.indexOf(l.inner) };
    });
    return a.loops.map((l, id) => ({ ref: `${a.name}/${l.name}`, plant: cascade.plant(id, 'nominal').tf, comp: compensatorTf(l.revisions[0]!.state.compensator) }));
  });
}

describe('listed phase crossovers', () => {
  it('are all real crossings of -180 deg (no jumps of the phase branch), on 160 cascade and delay loops', () => {
    let listed = 0;
    for (const { ref, plant, comp } of benchLoops(40)) {
      const m = analyseLoop(plant, comp, { step: false });
      const l = { num: polyMulPlain(comp.num, plant.num), den: polyMulPlain(comp.den, plant.den), delayS: plant.delayS + comp.delayS };
      for (const w of m.phaseCrossoversRadS) {
        if (w === 0 || w === Infinity) continue;
        listed++;
        expect(offMinus180(l, w), `${ref} at ${w} rad/s`).toBeLessThan(1e-6);
      }
    }
    expect(listed).toBeGreaterThan(1000);
  });
});

/** Product of two polynomials (ascending coefficients), written out here so the check shares no code with the analysis. */
function polyMulPlain(a: readonly number[], b: readonly number[]): number[] {
  const out = new Array<number>(a.length + b.length - 1).fill(0);
  a.forEach((x, i) => b.forEach((y, j) => { out[i + j] += x * y; }));
  return out;
}

describe('closed-loop poles of a delay loop with a cancelled plant pole', () => {
  // L = 12.5 (s + 750)/s * 500/(s + 750) e^{-sT}: D + N e^{-sT} = (s + 750)(s + 6250 e^{-sT}).
  // -750 is exact; the two real roots of s + K e^{-sT} are W_0(-KT)/T and W_-1(-KT)/T, from
  // scripts/reference/ref_delay_cancel.py (scipy.special.lambertw; numpy 2.4.6, scipy 1.17.1).
  const REAL_ROOTS = [-33695.88545906279, -10639.112953890008];
  const T = 5e-5;

  it('lists the cancelled pole at -750 and both real Lambert-W roots, for the gain as given and nudged by an ulp', () => {
    for (const k of [12.5, 12.5 * (1 + 2 ** -52), 12.5 * (1 - 2 ** -52)]) {
      const num = polyMulPlain([750 * k, k], [500]);
      const poles = delayClosedLoopPoles({ num, den: [0, 750, 1], delayS: T });
      const real = poles.filter((p) => p.im === 0).map((p) => p.re);
      expect(real.some((r) => Math.abs(r + 750) <= 1e-9 * 750), `gain ${k}: ${real.join(', ')}`).toBe(true);
      for (const want of REAL_ROOTS) expect(real.some((r) => Math.abs(r - want) <= 1e-9 * Math.abs(want)), `gain ${k}: ${want}`).toBe(true);
    }
  });
});
