import type { Block } from '../model/blocks.js';
import type { Poly } from '../model/tf.js';
import { blockTf } from './blocks-tf.js';

/**
 * A compensator as an expression in s that the expression parser (and so
 * `loopledger calc --comp`) reads back to the same transfer function: one factor
 * per block, numbers to 12 significant digits.
 */

/** A number as the parser reads it; negatives in parentheses. */
function num(x: number): string {
  const t = String(Number(x.toPrecision(12)));
  return x < 0 ? `(${t})` : t;
}

/** A polynomial (ascending coefficients) written from its highest power down. */
export function polyText(p: Poly): string {
  const terms: string[] = [];
  for (let k = p.length - 1; k >= 0; k--) {
    const c = p[k]!;
    if (c === 0) continue;
    const mag = String(Number(Math.abs(c).toPrecision(12)));
    const pow = k === 0 ? '' : k === 1 ? 's' : `s^${k}`;
    const body = k === 0 ? mag : mag === '1' ? pow : `${mag}*${pow}`;
    terms.push(terms.length === 0 ? (c < 0 ? `-${body}` : body) : `${c < 0 ? '-' : '+'}${body}`);
  }
  return terms.length === 0 ? '0' : terms.join('');
}

/** One block as a factor. */
export function blockExpr(b: Block): string {
  switch (b.kind) {
    case 'gain': return num(b.k);
    case 'integrator': return '1/s';
    case 'pi': return `(s+${num(b.zeroRadS)})/s`;
    case 'lead':
    case 'lag': return `(s/${num(b.zeroRadS)}+1)/(s/${num(b.poleRadS)}+1)`;
    case 'lowpass1': return `1/(s/${num(b.cornerRadS)}+1)`;
    case 'expr': return `(${b.text})`;
    default: {
      const t = blockTf(b);
      return `(${polyText(t.num)})/(${polyText(t.den)})`;
    }
  }
}

/** The whole compensator as one expression ("1" for no blocks). */
export function compensatorExpr(blocks: readonly Block[]): string {
  return blocks.length === 0 ? '1' : blocks.map(blockExpr).join('*');
}
