import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import type { Block } from '../../src/model/blocks.js';
import { biquadResponse, discretiseBlock } from '../../src/design/discretise.js';
import { blockTf } from '../../src/design/blocks-tf.js';
import { polyEvalJw } from '../../src/analysis/poly.js';
import { UserError } from '../../src/model/errors.js';

interface Case {
  name: string;
  block: Block;
  sample_s: number;
  prewarp_rad_s: number | null;
  expected: { b0: number; b1: number; b2: number; a1: number; a2: number };
}

// Values from scipy.signal.bilinear (scipy 1.17.1), see scripts/reference/discrete_reference.py.
const ref = JSON.parse(readFileSync(new URL('../../fixtures/reference/discrete-cases.json', import.meta.url), 'utf8')) as { cases: Case[] };

describe('Tustin discretisation against scipy.signal.bilinear', () => {
  for (const c of ref.cases) {
    it(c.name, () => {
      const d = discretiseBlock(c.block, c.sample_s, c.name);
      expect(d.prewarpRadS).toBe(c.prewarp_rad_s);
      const q = d.sections[0]!;
      for (const k of ['b0', 'b1', 'b2', 'a1', 'a2'] as const) {
        expect(q[k]).toBeCloseTo(c.expected[k], 10);
      }
    });
  }
});

describe('pre-warping', () => {
  it('makes a notch exact at its centre: the discrete gain there equals -depth dB', () => {
    // Property of the bilinear map with pre-warping at w0 (discrete response at w0 equals the
    // continuous one at w0); e.g. Oppenheim & Schafer, Discrete-Time Signal Processing, 3rd ed., sec. 7.1.2 (from memory).
    const block: Block = { kind: 'notch', centerRadS: 2 * Math.PI * 1500, depthDb: 30, q: 3 };
    const h = 1 / 8000;
    const q = discretiseBlock(block, h, 'notch').sections[0]!;
    const [re, im] = biquadResponse(q, block.centerRadS, h);
    expect(20 * Math.log10(Math.hypot(re, im))).toBeCloseTo(-30, 9);
  });

  it('keeps the DC gain of every block with a finite one', () => {
    const h = 1 / 4000;
    const blocks: Block[] = [
      { kind: 'lead', zeroRadS: 100, poleRadS: 900 },
      { kind: 'lowpass2', cornerRadS: 3000, zeta: 0.5 },
      { kind: 'gain', k: -3.5 },
    ];
    for (const b of blocks) {
      const t = blockTf(b);
      const dc = polyEvalJw(t.num, 0)[0] / polyEvalJw(t.den, 0)[0];
      const [re, im] = biquadResponse(discretiseBlock(b, h, b.kind).sections[0]!, 0, h);
      expect(re).toBeCloseTo(dc, 12);
      expect(im).toBeCloseTo(0, 12);
    }
  });
});

describe('refusals', () => {
  it('refuses a notch above the Nyquist frequency with a user error', () => {
    const b: Block = { kind: 'notch', centerRadS: 2 * Math.PI * 5000, depthDb: 20, q: 2 };
    expect(() => discretiseBlock(b, 1 / 8000, 'x/vel block 2')).toThrow(UserError);
    expect(() => discretiseBlock(b, 1 / 8000, 'x/vel block 2')).toThrow(/Nyquist/);
  });
});
