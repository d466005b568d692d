import type { Block } from '../model/blocks.js';
import { UserError } from '../model/errors.js';
import type { Poly, TransferFunction } from '../model/tf.js';
import { polyAdd, polyMul, polyPow, polyScale, polyTrim } from '../analysis/poly.js';
import { blockTf } from './blocks-tf.js';

/**
 * One discrete second-order section, a0 normalised to 1:
 *   y[n] = b0 x[n] + b1 x[n-1] + b2 x[n-2] - a1 y[n-1] - a2 y[n-2]
 * First-order sections have b2 = a2 = 0.
 */
export interface Biquad {
  readonly b0: number;
  readonly b1: number;
  readonly b2: number;
  readonly a1: number;
  readonly a2: number;
}

/** A block's discrete form: its sections and the frequency the bilinear map was pre-warped at (null: none). */
export interface DiscreteBlock {
  readonly sections: readonly Biquad[];
  readonly prewarpRadS: number | null;
}

/**
 * Bilinear (Tustin) map of N(s)/D(s) of order <= 2: s = K (z-1)/(z+1), K = 2/h, or
 * K = w0 / tan(w0 h / 2) to make the discrete response exact at w0 (pre-warping).
 * Published in e.g. Franklin, Powell & Workman, Digital Control of Dynamic Systems, 3rd ed., sec. 6.3.
 */
export function bilinearSection(num: Poly, den: Poly, sampleS: number, prewarpRadS: number | null): Biquad {
  const order = Math.max(num.length, den.length) - 1;
  if (order > 2) throw new Error('bilinearSection takes order 2 at most');
  const k = prewarpRadS === null ? 2 / sampleS : prewarpRadS / Math.tan((prewarpRadS * sampleS) / 2);
  // Each s^j becomes K^j (z-1)^j (z+1)^(order-j); coefficients in ascending powers of z.
  const mapped = (p: Poly): number[] => {
    let acc: number[] = [0];
    p.forEach((c, j) => {
      if (c === 0) return;
      const term = polyMul(polyPow([-1, 1], j), polyPow([1, 1], order - j));
      acc = polyAdd(acc, polyScale(term, c * k ** j));
    });
    return acc;
  };
  const pad = (p: number[]) => Array.from({ length: order + 1 }, (_, i) => p[i] ?? 0);
  // Ascending powers of z up to z^order; divide by z^order: z^(order-j) -> z^-j.
  const b = pad(mapped(num)).reverse();
  const a = pad(mapped(den)).reverse();
  const a0 = a[0]!;
  if (a0 === 0) throw new Error('bilinear map gave a zero leading denominator (pole at s = -K)');
  return { b0: b[0]! / a0, b1: (b[1] ?? 0) / a0, b2: (b[2] ?? 0) / a0, a1: (a[1] ?? 0) / a0, a2: (a[2] ?? 0) / a0 };
}

/** The frequency where a block's shape matters most: there the discrete response is made exact. */
export function blockPrewarpRadS(b: Block): number | null {
  switch (b.kind) {
    case 'notch': return b.centerRadS;
    case 'lead':
    case 'lag': return Math.sqrt(b.zeroRadS * b.poleRadS);
    case 'lowpass1':
    case 'lowpass2': return b.cornerRadS;
    default: return null;
  }
}

/** Highest frequency a block places a pole or zero at (for the Nyquist check). */
function blockTopRadS(b: Block): number {
  switch (b.kind) {
    case 'notch': return b.centerRadS;
    case 'lead':
    case 'lag': return Math.max(b.zeroRadS, b.poleRadS);
    case 'lowpass1':
    case 'lowpass2': return b.cornerRadS;
    case 'pi': return b.zeroRadS;
    case 'pid': return Number.isFinite(b.filterRadS) ? b.filterRadS : Infinity;
    default: return 0;
  }
}

/**
 * Discretises one block for a controller running every `sampleS` seconds. Blocks
 * above order 2 (generic expressions) are refused: write them as separate blocks.
 * A block with a pole or zero at or above the Nyquist frequency cannot be
 * represented and is refused; the caller warns from 1/4 of the sample rate up.
 */
export function discretiseBlock(b: Block, sampleS: number, where: string): DiscreteBlock {
  const nyquistRadS = Math.PI / sampleS;
  const top = blockTopRadS(b);
  if (top >= nyquistRadS) {
    throw new UserError(`${where}: a ${b.kind} block at ${(top / (2 * Math.PI)).toPrecision(4)} Hz lies at or above the Nyquist frequency ${(nyquistRadS / (2 * Math.PI)).toPrecision(4)} Hz; lower it or raise the sample rate`);
  }
  const t: TransferFunction = blockTf(b);
  if (t.delayS !== 0) throw new UserError(`${where}: a pure delay cannot be exported as a filter section; remove exp(...) from the block`);
  if (Math.max(t.num.length, t.den.length) - 1 > 2) {
    throw new UserError(`${where}: this expression is above second order; split it into blocks of order 2 or less to export it`);
  }
  const prewarp = blockPrewarpRadS(b);
  return { sections: [bilinearSection(polyTrim(t.num), polyTrim(t.den), sampleS, prewarp)], prewarpRadS: prewarp };
}

/** Frequency response of a section at w (rad/s): H(e^{j w h}) as [re, im]. */
export function biquadResponse(q: Biquad, wRadS: number, sampleS: number): [number, number] {
  const th = wRadS * sampleS;
  const c1 = Math.cos(th), s1 = Math.sin(th), c2 = Math.cos(2 * th), s2 = Math.sin(2 * th);
  const nr = q.b0 + q.b1 * c1 + q.b2 * c2;
  const ni = -(q.b1 * s1 + q.b2 * s2);
  const dr = 1 + q.a1 * c1 + q.a2 * c2;
  const di = -(q.a1 * s1 + q.a2 * s2);
  const d = dr * dr + di * di;
  return [(nr * dr + ni * di) / d, (ni * dr - nr * di) / d];
}

/** A whole compensator for firmware: one entry per block, in series order, and warnings. */
export interface DiscreteCompensator {
  readonly sampleS: number;
  readonly blocks: readonly { readonly block: Block; readonly discrete: DiscreteBlock }[];
  readonly warnings: readonly string[];
}

/**
 * Discretises every block of a compensator at one sample time. Warns where a block
 * sits above a quarter of the sample rate, where the bilinear map bends the
 * response noticeably even with pre-warping at one frequency.
 */
export function discretiseCompensator(blocks: readonly Block[], sampleS: number, where: string): DiscreteCompensator {
  if (!(sampleS > 0) || !Number.isFinite(sampleS)) throw new UserError(`${where}: the sample time must be a positive number`);
  const warnings: string[] = [];
  const quarterRadS = Math.PI / (2 * sampleS);
  const out = blocks.map((block, i) => {
    const label = `${where} block ${i + 1} (${block.kind})`;
    const top = blockTopRadS(block);
    if (top > quarterRadS && Number.isFinite(top)) {
      warnings.push(`${label}: at ${(top / (2 * Math.PI)).toPrecision(4)} Hz it is above a quarter of the sample rate; check the discrete response`);
    }
    return { block, discrete: discretiseBlock(block, sampleS, label) };
  });
  return { sampleS, blocks: out, warnings };
}
