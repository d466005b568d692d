import { describe, expect, it } from 'vitest';
import { metricsToContractJson } from '../../src/analysis/contract-json.js';
import { analyseLoop } from '../../src/analysis/loop.js';

// The key list is the contract of DESIGN.md ("The one-loop calculator contract"), plus warnings.
const KEYS = [
  'stable', 'closed_loop_poles', 'closed_loop_dc_gain', 'system_type', 'kp', 'kv', 'ka',
  'gain_crossovers_rad_s', 'phase_margins_deg', 'phase_margin_deg', 'phase_margin_at_rad_s',
  'phase_crossovers_rad_s', 'gain_margins_db', 'gain_margin_db', 'gain_margin_at_rad_s',
  'gain_margin_upper_db', 'gain_margin_lower_db', 'delay_margin_s', 'peak_sensitivity',
  'peak_sensitivity_at_rad_s', 'peak_complementary', 'bandwidth_rad_s', 'step', 'warnings',
];
const STEP_KEYS = ['overshoot_pct', 'undershoot_pct', 'rise_time_s', 'settling_time_s', 'peak_time_s', 'final_value', 'peak_effort'];
const ONE = { num: [1], den: [1], delayS: 0 };

describe('metricsToContractJson', () => {
  it('has exactly the contract keys, infinities as strings, and survives a JSON round trip', () => {
    const j = metricsToContractJson(analyseLoop({ num: [400], den: [0, 20, 1], delayS: 0 }, ONE));
    expect(Object.keys(j).sort()).toEqual([...KEYS].sort());
    expect(Object.keys(j.step as object).sort()).toEqual([...STEP_KEYS].sort());
    expect(j.kp).toBe('inf');
    expect(j.gain_margin_db).toBeNull(); // no phase crossover
    expect(JSON.parse(JSON.stringify(j))).toEqual(j);
  });

  it('writes -inf, nulls for unstable step metrics, and never NaN even for a marginal loop', () => {
    const unstable = metricsToContractJson(analyseLoop({ num: [-14, -7], den: [0, 0, 5, 1], delayS: 0 }, ONE));
    expect(unstable.kp).toBe('-inf');
    expect(unstable.step).toBeNull();
    const marginal = JSON.stringify(metricsToContractJson(analyseLoop({ num: [1], den: [0, 0, 1], delayS: 0 }, ONE)));
    expect(marginal).not.toMatch(/NaN/);
    expect(marginal).toMatch(/"stable":false/);
  });
});
