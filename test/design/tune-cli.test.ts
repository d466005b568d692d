import { describe, expect, it } from 'vitest';
import { cli, ok, refused } from '../cli/run.js';

/** The store-free face of the design assistant: `tune --plant ... METHOD`. */

describe('loopledger tune --plant (no store)', () => {
  it('JSON: comp_expr that calc accepts, blocks with parameters, the worksheet, and contract metrics that calc confirms', async () => {
    const r = await cli('tune', '--plant', '4/(s*(s+2))', 'lead', '--pm', '50', '--kv', '20', '--json');
    const j = JSON.parse(ok(r)) as {
      ok: boolean; comp_expr: string; blocks: { kind: string; text: string; zero_rad_s?: number; pole_rad_s?: number; k?: number }[];
      worksheet: { label: string; value: unknown; unit: string }[]; variants: { variant: string; metrics: Record<string, unknown> }[]; safety: string;
    };
    expect(j.ok).toBe(true);
    expect(j.blocks.map((b) => b.kind)).toEqual(['gain', 'lead']);
    expect(j.blocks[0]!.k).toBe(10);
    expect(j.blocks[1]!.zero_rad_s).toBeLessThan(j.blocks[1]!.pole_rad_s!);
    expect(j.worksheet.some((s) => s.label.startsWith('alpha') && typeof s.value === 'number')).toBe(true);
    expect(j.safety).toMatch(/reduced gain.*emergency stop.*regulations/);
    const predicted = j.variants[0]!.metrics;
    const calc = JSON.parse(ok(await cli('calc', '--plant', '4/(s*(s+2))', '--comp', j.comp_expr, '--json'))) as Record<string, unknown>;
    expect(calc.phase_margin_deg as number).toBeCloseTo(predicted.phase_margin_deg as number, 6);
    expect(calc.kv as number).toBeCloseTo(20, 6);
    expect(Math.abs((calc.phase_margin_deg as number) - 50)).toBeLessThan(0.1);
  });

  it('plain text: worksheet with units, blocks in block syntax, per-variant predictions, requirement outcomes, safety line', async () => {
    const out = ok(await cli('tune', '--plant', 'light=4/(s*(s+2))', '--plant', 'heavy=2/(s*(s+2))', 'lag', '--spec', 'pm>=40', '--spec', 'kv>=10'));
    expect(out).toMatch(/worksheet:/);
    expect(out).toMatch(/new crossover\s+[\d.]+rad\/s/);
    expect(out).toMatch(/proposed compensator:\n {2}gain:\S+ lag:\S+rad\/s\/\S+rad\/s/);
    expect(out).toMatch(/^ {2}light\s+\+ pass/m);
    expect(out).toMatch(/^ {2}heavy\s+\+ pass/m);
    expect(out).toMatch(/pm>=40deg\s+heavy/);
    expect(out).toMatch(/^safety: model margins do not replace verification on the machine/m);
  });

  it('a proposal that misses a requirement exits 1 and says which', async () => {
    const r = await cli('tune', '--plant', '1/(s*(s+1))*exp(-0.3*s)', 'lead', '--pm', '60', '--kv', '10');
    expect(r.code).toBe(1);
    expect(r.out).toMatch(/cannot be reached/);
    expect(r.out).toMatch(/best achievable is/);
  });

  it('refuses bad input with one line and exit 2', async () => {
    expect(refused(await cli('tune', '--plant', '1/(s+1)', 'wobble', '--pm', '45'))).toMatch(/unknown method 'wobble'/);
    expect(refused(await cli('tune', '--plant', '1/(s+1)', 'lead'))).toMatch(/--pm/);
    expect(refused(await cli('tune', '--plant', '1/(s+1)', 'lead', '--pm', '45', '--apply', '-m', 'x'))).toMatch(/cannot --apply/);
    expect(refused(await cli('tune', '--plant', '1/(s+1)', 'lead', '--pm', '45', '--kv', '2', '--kp', '3'))).toMatch(/one of --kv, --kp, --ka/);
    expect(refused(await cli('tune', '--plant', '1/(s+1)', 'pid', '--pm', '45', '--fc', '-3'))).toMatch(/--fc/);
    expect(refused(await cli('tune', '--plant', '1/(s+', 'lead', '--pm', '45'))).toMatch(/plant/);
  });
});
