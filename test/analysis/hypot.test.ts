import { describe, expect, it } from 'vitest';
import { hypot2 } from '../../src/analysis/hypot.js';

// The check value is the platform's own Math.hypot: hypot2 stands in for it in the
// analysis, and stored results stay byte-identical only if every bit agrees.

/** Deterministic 64-bit LCG (Knuth's MMIX constants), so a failure can be reproduced. */
function bitsSource(seed: bigint): () => bigint {
  let s = seed;
  return () => (s = (s * 6364136223846793005n + 1442695040888963407n) & 0xffffffffffffffffn);
}

describe('hypot2', () => {
  it('equals Math.hypot bit for bit on special values (zeros, infinities, NaN, subnormals, extremes)', () => {
    const specials = [0, -0, 1, -1, 3, -4, 0.1, Infinity, -Infinity, Number.NaN, Number.MIN_VALUE, -Number.MIN_VALUE, 2.2250738585072014e-308, Number.MAX_VALUE, -Number.MAX_VALUE, 1e-160, 1e160, 1e-300, 1e300];
    for (const x of specials) for (const y of specials) expect(Object.is(hypot2(x, y), Math.hypot(x, y)), `hypot(${x}, ${y})`).toBe(true);
  });

  it('equals Math.hypot bit for bit on random bit patterns, spread magnitudes and near-equal pairs', () => {
    const next = bitsSource(20261201n);
    const buf = new Float64Array(1);
    const bits = new BigUint64Array(buf.buffer);
    const anyDouble = () => { bits[0] = next(); return buf[0]!; };
    const unit = () => Number(next() >> 11n) / 2 ** 53;
    let mismatches = 0;
    for (let i = 0; i < 300_000; i++) {
      let x: number;
      let y: number;
      if (i % 3 === 0) { x = anyDouble(); y = anyDouble(); }
      else if (i % 3 === 1) { x = (unit() - 0.5) * 10 ** (40 * unit() - 20); y = (unit() - 0.5) * 10 ** (40 * unit() - 20); }
      else { x = 2 * unit() - 1; y = x * (1 + (unit() - 0.5) * 1e-8); }
      if (!Object.is(hypot2(x, y), Math.hypot(x, y))) mismatches++;
    }
    expect(mismatches).toBe(0);
  });
});
