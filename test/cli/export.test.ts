import fs from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { biquadResponse } from '../../src/design/discretise.js';
import { ok, refused, storeCli, tempDir } from './run.js';

/** A one-loop store with a notch compensator, sampled at 4 kHz. */
async function notchStore() {
  const file = path.join(tempDir(), 'export.loopledger.db');
  const run = storeCli(file);
  ok(await run('init', '--name', 'export rig', '--units', 'hz'));
  ok(await run('axis', 'add', 'A'));
  ok(await run('loop', 'add', 'A/vel', '--plant', '900/(s*(s/300+1))', '--sample-rate', '4kHz'));
  ok(await run('comp', 'set', 'A/vel', 'gain:0.8', 'notch:500Hz,depth=20dB,q=2', 'lp1:1200Hz'));
  return { run, file };
}

describe('export', () => {
  it('writes one section per block; the pre-warped notch keeps its depth at its centre', async () => {
    const { run } = await notchStore();
    const j = JSON.parse(ok(await run('export', 'A/vel', '--format', 'json')));
    expect(j.sample_rate_hz).toBe(4000);
    expect(j.blocks.map((b: { block: string }) => b.block)).toEqual(['gain:0.8', 'notch:500Hz,depth=20dB,q=2', 'lp1:1200Hz']);
    // Bilinear map pre-warped at w0 is exact at w0 (e.g. Oppenheim & Schafer, Discrete-Time Signal
    // Processing, 3rd ed., sec. 7.1.2; from memory): the notch is -20 dB at 500 Hz after discretising.
    const notch = j.blocks[1];
    expect(notch.prewarp_rad_s).toBeCloseTo(2 * Math.PI * 500, 9);
    const [re, im] = biquadResponse(notch.sections[0], 2 * Math.PI * 500, 1 / 4000);
    expect(20 * Math.log10(Math.hypot(re, im))).toBeCloseTo(-20, 9);
    // 1.2 kHz is above a quarter of 4 kHz: the export says so.
    expect(j.warnings.join(' ')).toMatch(/block 3 \(lowpass1\).*quarter of the sample rate/);
    expect(j.caution).toMatch(/reduced gain/);
  });

  it('writes a C array to a file with the caution in its header', async () => {
    const { run } = await notchStore();
    const out = path.join(tempDir(), 'a_vel.h');
    expect(ok(await run('export', 'A/vel', '--format', 'c', '-o', out))).toContain(`wrote ${out}`);
    const text = fs.readFileSync(out, 'utf8');
    expect(text).toContain('#define A_VEL_SECTIONS 3');
    expect(text).toContain('emergency stop');
    expect(text.match(/^  \{ /gm)).toHaveLength(3);
  });

  it('refuses bad input with one line and nothing on stdout', async () => {
    const { run } = await notchStore();
    expect(refused(await run('export', 'A/vel', '--format', 'xml'))).toMatch(/--format 'xml'/);
    expect(refused(await run('export', 'A/vel', '--rate', '600Hz'))).toMatch(/Nyquist/);
    expect(refused(await run('export', 'A/nope'))).toMatch(/A\/nope/);
  });
});
