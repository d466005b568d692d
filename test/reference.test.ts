import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { metricsToContractJson } from '../src/analysis/contract-json.js';
import { analyseExpressions } from '../src/analysis/loop-text.js';
import {
  TOL,
  compareRightmostPole,
  comparePairedLists,
  comparePoleMultiset,
  compareScalar,
  compareStep,
  toNum,
} from './reference-compare.js';

/**
 * Every key of the one-loop calculator contract (DESIGN.md) against an independent
 * reference table computed with numpy 2.4.6 / scipy 1.17.1 by
 * scripts/reference/make_reference.py (methods and self-checks described there).
 * Tolerances: see TOL in reference-compare.ts; the JSON records the same figures.
 */

interface RefCase {
  name: string;
  why: string;
  plant: string;
  comp: string;
  expected: Record<string, unknown> & { closed_loop_poles: { re: number; im: number }[] };
}

const table = JSON.parse(readFileSync(new URL('../fixtures/reference/loops.json', import.meta.url), 'utf8')) as {
  numpy: string;
  scipy: string;
  tolerances: Record<string, number>;
  cases: RefCase[];
};

const CONTRACT_KEYS = [
  'stable', 'closed_loop_poles', 'closed_loop_dc_gain', 'system_type', 'kp', 'kv', 'ka',
  'gain_crossovers_rad_s', 'phase_margins_deg', 'phase_margin_deg', 'phase_margin_at_rad_s',
  'phase_crossovers_rad_s', 'gain_margins_db', 'gain_margin_db', 'gain_margin_at_rad_s',
  'gain_margin_upper_db', 'gain_margin_lower_db', 'delay_margin_s', 'peak_sensitivity',
  'peak_sensitivity_at_rad_s', 'peak_complementary', 'bandwidth_rad_s', 'step',
] as const;

/** All mismatches between our contract JSON and the reference for one case. */
function mismatches(c: RefCase): string[] {
  const ours = metricsToContractJson(analyseExpressions(c.plant, c.comp));
  const ref = c.expected;
  const hasDelay = /exp\(/.test(c.plant) || /exp\(/.test(c.comp);
  const out: string[] = CONTRACT_KEYS.filter((k) => !(k in ours)).map((k) => `${k}: missing from our JSON`);
  if (ours.stable !== ref.stable) out.push(`stable: ours ${String(ours.stable)} vs reference ${String(ref.stable)}`);
  if (ours.system_type !== ref.system_type) out.push(`system_type: ours ${String(ours.system_type)} vs reference ${String(ref.system_type)}`);
  for (const k of ['closed_loop_dc_gain', 'kp', 'kv', 'ka']) out.push(...compareScalar(k, ours[k], ref[k], TOL.exactRel, 1e-12));
  const oursPoles = ours.closed_loop_poles as { re: number; im: number }[];
  out.push(...(hasDelay ? compareRightmostPole(oursPoles, ref.closed_loop_poles) : comparePoleMultiset(oursPoles, ref.closed_loop_poles)));
  if (hasDelay && !(ours.warnings as string[]).some((w) => /approximate/i.test(w))) {
    out.push('warnings: DESIGN.md asks for a warning that delay-loop poles are approximate');
  }
  out.push(...comparePairedLists(['gain_crossovers_rad_s', 'phase_margins_deg'], [ours.gain_crossovers_rad_s, ours.phase_margins_deg],
    [ref.gain_crossovers_rad_s, ref.phase_margins_deg], TOL.marginFloor));
  // with a delay, compare only the phase crossovers whose gain margin is <= 40 dB (the lists never end)
  const keep = hasDelay ? (_w: number, gm: number) => gm <= TOL.delayGmListDb : undefined;
  out.push(...comparePairedLists(['phase_crossovers_rad_s', 'gain_margins_db'], [ours.phase_crossovers_rad_s, ours.gain_margins_db],
    [ref.phase_crossovers_rad_s, ref.gain_margins_db], TOL.marginFloor, keep));
  for (const k of ['phase_margin_deg', 'gain_margin_db', 'gain_margin_upper_db', 'gain_margin_lower_db', 'delay_margin_s',
    'peak_sensitivity', 'peak_complementary']) {
    out.push(...compareScalar(k, ours[k], ref[k], TOL.rel, TOL.marginFloor));
  }
  for (const k of ['phase_margin_at_rad_s', 'gain_margin_at_rad_s', 'peak_sensitivity_at_rad_s', 'bandwidth_rad_s']) {
    out.push(...compareScalar(k, ours[k], ref[k], TOL.rel, TOL.freqFloorRadS));
  }
  out.push(...compareStep(ours.step, ref.step));
  return out;
}

describe(`reference table (numpy ${table.numpy}, scipy ${table.scipy})`, () => {
  it('covers at least 24 loops and records the tolerances this test uses', () => {
    expect(table.cases.length).toBeGreaterThanOrEqual(24);
    expect(table.tolerances.frequency_and_margin_rel).toBe(TOL.rel);
    expect(table.tolerances.step_time_rel).toBe(TOL.stepTimeRel);
    expect(table.tolerances.overshoot_undershoot_abs_pct).toBe(TOL.shootPct);
    expect(table.tolerances.margin_abs_floor_deg_db).toBe(TOL.marginFloor);
    expect(toNum('inf')).toBe(Infinity);
  });

  for (const c of table.cases) {
    it(`${c.name}: ${c.why}`, () => {
      expect(mismatches(c), `${c.name} (plant ${c.plant}, comp ${c.comp})`).toEqual([]);
    });
  }
});
