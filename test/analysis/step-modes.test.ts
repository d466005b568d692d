import { describe, expect, it } from 'vitest';
import type { Complex, TransferFunction } from '../../src/model/tf.js';
import { loopModes, type Mode } from '../../src/analysis/step-modes.js';
import { MAX_WEIGHT, planStep } from '../../src/analysis/step-plan.js';

/**
 * Mode sizes against partial fractions, and the planner's bounds on inputs that once hung it.
 * Partial-fraction expansion with a repeated pole: Ogata, Modern Control Engineering, 5th ed.,
 * sec. 2-4 (from memory).
 */

const tf = (num: number[], den: number[], delayS = 0): TransferFunction => ({ num, den, delayS });
const unity = tf([1], [1]);
const at = (re: number, im = 0): Complex => ({ re, im });

/** The term of the given power at the mode nearest to p. */
function term(modes: Mode[], p: Complex, power: number): Mode {
  const near = modes.filter((m) => Math.hypot(m.p.re - p.re, m.p.im - p.im) < 1e-6 && m.power === power);
  expect(near.length).toBe(1);
  return near[0]!;
}

describe('loopModes', () => {
  it('cancelled loop (s+1)/(s(s+1)): Y/s = 1/(s(s+1)) and U/s = 1/(s+1), one simple mode at -1 despite the double closed-loop pole', () => {
    const modes = loopModes(tf([1, 1], [0, 1, 1]), unity, [at(-1), at(-1)]);
    expect(Math.abs(term(modes, at(-1), 0).yAmp - 1)).toBeLessThan(1e-9);
    expect(Math.abs(term(modes, at(-1), 0).uAmp - 1)).toBeLessThan(1e-9);
    for (const m of modes.filter((x) => x.power > 0)) {
      expect(m.yAmp).toBeLessThan(1e-9);
      expect(m.uAmp).toBeLessThan(1e-9);
    }
  });

  it('true double pole, P = 1/(s(s+2)): Y/s = 1/s - 1/(s+1) - 1/(s+1)^2 and U/s = 1/(s+1) + 1/(s+1)^2', () => {
    for (const poles of [[at(-1), at(-1)], [at(-1 - 1e-8), at(-1 + 1e-8)], [at(-1, 1e-5), at(-1, -1e-5)]]) {
      const modes = loopModes(tf([1], [0, 2, 1]), unity, poles);
      const c = { re: (poles[0]!.re + poles[1]!.re) / 2, im: 0 };
      for (const power of [0, 1]) {
        expect(Math.abs(term(modes, c, power).yAmp - 1)).toBeLessThan(1e-6);
        expect(Math.abs(term(modes, c, power).uAmp - 1)).toBeLessThan(1e-6);
      }
    }
  });

  it('simple poles: the residues of Y/s for the closed loop 2/((s+1)(s+2)) are -2 at -1 and 1 at -2', () => {
    // P = 2/(s^2 + 3s): closed loop 2/(s^2 + 3s + 2); Y/s = 1/s - 2/(s+1) + 1/(s+2).
    const modes = loopModes(tf([2], [0, 3, 1]), unity, [at(-1), at(-2)]);
    expect(Math.abs(term(modes, at(-1), 0).yAmp - 2)).toBeLessThan(1e-9);
    expect(Math.abs(term(modes, at(-2), 0).yAmp - 1)).toBeLessThan(1e-9);
  });

  it('a double pole listed once, P = 1/(s(s+2)): not taken for a simple one; the circle finds both terms 1/(s+1), 1/(s+1)^2', () => {
    // Exactly at the root Delta'(-1) = 0 (the residue formula is infinite); 1e-7 off it, |p Delta'(p)| is 5e-8 of the
    // size of Delta's terms (ill-conditioned); 1e-4 off it, p is no root (a Newton step leaves the room).
    for (const p of [at(-1), at(-1 - 1e-7), at(-1.0001)]) {
      const modes = loopModes(tf([1], [0, 2, 1]), unity, [p]);
      for (const power of [0, 1]) {
        expect(Math.abs(term(modes, p, power).yAmp - 1)).toBeLessThan(2e-4);
        expect(Math.abs(term(modes, p, power).uAmp - 1)).toBeLessThan(2e-4);
      }
      expect(modes.every((m) => Number.isFinite(m.yAmp) && Number.isFinite(m.uAmp))).toBe(true);
    }
  });

  it('two simple poles 6 % apart (no cluster): partial fractions of 1.06/(s(s+1)(s+1.06)) give 53/3 at -1 and 50/3 at -1.06', () => {
    // P = 1.06/(s^2 + 2.06 s): closed loop 1.06/((s+1)(s+1.06)).
    const modes = loopModes(tf([1.06], [0, 2.06, 1]), unity, [at(-1), at(-1.06)]);
    expect(Math.abs(term(modes, at(-1), 0).yAmp - 53 / 3)).toBeLessThan(1e-9);
    expect(Math.abs(term(modes, at(-1.06), 0).yAmp - 50 / 3)).toBeLessThan(1e-9);
  });

  it('with a delay, P = e^(-0.2 s)/s: the root W(-0.2)/0.2 has residues -1/(1 + pT) in Y/s and 1/(1 + pT) in U/s = 1/Delta; the delay-free estimate -1, no root, holds no mode', () => {
    // Values from scripts/step_modes_delay.py (scipy 1.17.1 lambertw).
    const p = at(-1.2958555090953685);
    const modes = loopModes(tf([1], [0, 1], 0.2), unity, [p, at(-1)]);
    expect(Math.abs(term(modes, p, 0).yAmp - 1.349839352184367)).toBeLessThan(1e-9);
    expect(Math.abs(term(modes, p, 0).uAmp - 1.349839352184367)).toBeLessThan(1e-9);
    for (const m of modes.filter((x) => x.p.re === -1)) {
      expect(m.yAmp).toBeLessThan(1e-8);
      expect(m.uAmp).toBeLessThan(1e-8);
    }
  });
});

describe('planStep bounds', () => {
  const mode = (p: Complex, yAmp: number, power = 0): Mode => ({ p, power, spread: 0, yAmp, uAmp: 0 });

  it('an unknown mode size (infinite, NaN) is capped with a warning and gives a finite grid within the budget', () => {
    for (const amp of [Infinity, NaN, 1e300]) {
      const plan = planStep([mode(at(-1), amp), mode(at(-3, 4), 0.5)], [], 0, 0, 1, 1, { maxSamples: 5000 });
      expect(plan.warnings.join(' ')).toContain(MAX_WEIGHT.toExponential(0));
      expect(plan.h0S).toBeGreaterThan(0);
      expect(Number.isFinite(plan.durationS)).toBe(true);
      expect(plan.levels.reduce((a, l) => a + l.steps, 0)).toBeLessThanOrEqual(5000);
    }
  });

  it('a mode too slow for doubles still gives a finite plan, cut at the budget', () => {
    const plan = planStep([mode(at(-5e-324), 1), mode(at(-1), 1)], [], 0, 0, 1, 1, { maxSamples: 1000 });
    expect(plan.cut).toBe(true);
    expect(Number.isFinite(plan.durationS)).toBe(true);
    expect(plan.levels.reduce((a, l) => a + l.steps, 0)).toBe(1000);
  });

  it('a delay of more than 2^60 steps of the fastest mode: coarser steps up to the delay only, said in a warning, and the run counts as cut', () => {
    const plan = planStep([mode(at(-1e9), 1), mode(at(-1), 1)], [], 1e30, 0, 1, 1, { maxSamples: 2000 });
    expect(plan.cut).toBe(true);
    expect(plan.warnings.join(' ')).toMatch(/more than 2\^60 steps/);
    expect(plan.delayTicks).toBe(2 ** 60);
    expect(plan.h0S).toBe(1e30 / 2 ** 60);
    expect(plan.levels.reduce((a, l) => a + l.steps, 0)).toBeLessThanOrEqual(2000);
  });
});
