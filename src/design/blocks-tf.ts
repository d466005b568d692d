import type { Block, Compensator } from '../model/blocks.js';
import type { Poly, TransferFunction } from '../model/tf.js';
import { polyMul, polyTrim } from '../analysis/poly.js';

const tf = (num: Poly, den: Poly, delayS = 0): TransferFunction => ({ num: polyTrim(num), den: polyTrim(den), delayS });

/** The transfer function of one block (ascending coefficients; see src/model/blocks.ts for each form). */
export function blockTf(b: Block): TransferFunction {
  switch (b.kind) {
    case 'gain':
      return tf([b.k], [1]);
    case 'integrator':
      return tf([1], [0, 1]);
    case 'pi':
      return tf([b.zeroRadS, 1], [0, 1]);
    case 'lead':
    case 'lag':
      return tf([1, 1 / b.zeroRadS], [1, 1 / b.poleRadS]);
    case 'pid':
      return pidTf(b.kp, b.ki, b.kd, b.filterRadS);
    case 'notch': {
      const w = b.centerRadS;
      const zp = 1 / (2 * b.q);
      const zz = zp * 10 ** (-b.depthDb / 20);
      return tf([w * w, 2 * zz * w, 1], [w * w, 2 * zp * w, 1]);
    }
    case 'lowpass1':
      return tf([1], [1, 1 / b.cornerRadS]);
    case 'lowpass2': {
      const w = b.cornerRadS;
      return tf([w * w], [w * w, 2 * b.zeta * w, 1]);
    }
    case 'expr':
      return b.tf;
  }
}

/**
 * kp + ki/s + kd s/(s/wf + 1). Without an integral term the common factor s is
 * not written at all (it would be a cancelled pole-zero pair at the origin).
 * filterRadS = Infinity gives the ideal (improper) derivative.
 */
function pidTf(kp: number, ki: number, kd: number, wf: number): TransferFunction {
  const a = Number.isFinite(wf) ? 1 / wf : 0; // derivative filter time constant
  // Over the common denominator s (a s + 1):
  const num = [ki, kp + ki * a, kp * a + kd];
  const den = [0, 1, a];
  return ki === 0 ? tf(num.slice(1), den.slice(1)) : tf(num, den);
}

/** The compensator as one transfer function: the blocks in series (delays add). */
export function compensatorTf(c: Compensator): TransferFunction {
  let num: number[] = [1];
  let den: number[] = [1];
  let delayS = 0;
  for (const b of c.blocks) {
    const t = blockTf(b);
    num = polyMul(num, t.num);
    den = polyMul(den, t.den);
    delayS += t.delayS;
  }
  return tf(num, den, delayS);
}

/** |C(j inf)|: noise gain at high frequency (0 if strictly proper, Infinity if improper). */
export function compensatorHfGain(c: Compensator): number {
  const t = compensatorTf(c);
  const n = t.num.length - 1;
  const d = t.den.length - 1;
  if (n < d) return 0;
  if (n > d) return Infinity;
  return Math.abs(t.num[n]! / t.den[d]!);
}
