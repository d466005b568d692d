import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { main } from '../../src/cli/main.js';

/** Runs the CLI in-process and captures what it writes. */
async function cli(...args: string[]): Promise<{ code: number; out: string; err: string }> {
  let out = '';
  let err = '';
  const o = vi.spyOn(process.stdout, 'write').mockImplementation((t: string | Uint8Array) => ((out += String(t)), true));
  const e = vi.spyOn(process.stderr, 'write').mockImplementation((t: string | Uint8Array) => ((err += String(t)), true));
  try {
    return { code: await main(args), out, err };
  } finally {
    o.mockRestore();
    e.mockRestore();
  }
}

describe('loopledger calc', () => {
  let dir = '';
  beforeEach(() => {
    dir = mkdtempSync(join(tmpdir(), 'calc-'));
  });
  afterEach(() => rmSync(dir, { recursive: true, force: true }));

  it('--json prints one contract object (K/(s(s+a)): PM = atan(a/wc))', async () => {
    const r = await cli('calc', '--plant', '400/(s*(s+20))', '--comp', '1', '--json');
    expect(r.code).toBe(0);
    expect(r.err).toBe('');
    const j = JSON.parse(r.out);
    const wc = Math.sqrt((-400 + Math.sqrt(800000)) / 2);
    expect(j.phase_margin_deg).toBeCloseTo((Math.atan(20 / wc) * 180) / Math.PI, 9);
    expect(j.kp).toBe('inf');
    expect(r.out.trim().split('\n')).toHaveLength(1);
  });

  it('prints a readable summary with units by default', async () => {
    const r = await cli('calc', '--plant', 'exp(-0.5*s)/(s+1)', '--comp', '2');
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/phase margin\s+70\.38 deg at 1\.732 rad\/s/);
    expect(r.out).toMatch(/gain margin\s+5\.59\d? dB/);
    expect(r.out).toMatch(/warning: closed-loop poles approximate/);
  });

  it.each([
    ['syntax error', ['--plant', '(s+1']],
    ['unknown symbol', ['--plant', 'k/(s+1)']],
    ['division by a zero polynomial', ['--plant', '1/(s-s)']],
    ['more than one delay', ['--plant', 'exp(-s)*exp(-s)/(s+1)']],
    ['positive delay exponent', ['--plant', 'exp(0.1*s)/(s+1)']],
    ['non-finite number', ['--plant', '1e999/(s+1)']],
    ['improper plant', ['--plant', 's^2/(s+1)']],
    ['improper compensator without --ideal', ['--plant', '1/(s+1)', '--comp', 's']],
    ['missing --plant', ['--comp', '1']],
    ['unknown option', ['--plant', '1/s', '--bogus']],
    ['value starting with a dash, not joined', ['--plant', '1/s', '--comp', '-1']],
  ])('%s: exit 2, one line on stderr, nothing on stdout', async (_name, args) => {
    const r = await cli('calc', ...args, '--json');
    expect(r.code).toBe(2);
    expect(r.out).toBe('');
    expect(r.err.trim().split('\n')).toHaveLength(1);
    expect(r.err).toMatch(/^loopledger: /);
  });

  it('says how to write a value that starts with a dash', async () => {
    const r = await cli('calc', '--plant', '1/s', '--comp', '-1');
    expect(r.err).toMatch(/--comp=-1/);
    expect((await cli('calc', '--plant', '1/(s*(s+1))', '--comp=-1', '--json')).code).toBe(0);
  });

  it('--ideal admits an improper compensator and says why step metrics are missing', async () => {
    const r = await cli('calc', '--plant', '1/(s*(s+1))', '--comp', '2*(s+1)', '--ideal', '--json');
    expect(r.code).toBe(0);
    const j = JSON.parse(r.out);
    expect(j.step).toBeNull();
    expect(j.warnings.join(' ')).toMatch(/proper/);
  });

  it('--batch: one object per non-blank line, same order, errors per line, ids echoed', async () => {
    const file = join(dir, 'loops.jsonl');
    writeFileSync(file, [
      JSON.stringify({ id: 'a', plant: '400/(s*(s+20))', comp: '1' }),
      'not json',
      '',
      JSON.stringify({ id: 'c', plant: '1/(s-s)' }),
      JSON.stringify({ plant: '1/(s+1)', comp: '3' }),
    ].join('\n'));
    const r = await cli('calc', '--batch', file);
    expect(r.code).toBe(0);
    const lines = r.out.trim().split('\n').map((l) => JSON.parse(l));
    expect(lines).toHaveLength(4);
    expect(lines[0].id).toBe('a');
    expect(lines[0].stable).toBe(true);
    expect(lines[1].error).toMatch(/not valid JSON/);
    expect(lines[2]).toMatchObject({ id: 'c' });
    expect(lines[2].error).toMatch(/zero polynomial/);
    expect(lines[3].closed_loop_dc_gain).toBeCloseTo(0.75, 14); // Kp/(1+Kp) with Kp = 3
  });

  it('--batch with a missing file is a usage error', async () => {
    const r = await cli('calc', '--batch', join(dir, 'nope.jsonl'));
    expect(r.code).toBe(2);
    expect(r.out).toBe('');
  });
});
