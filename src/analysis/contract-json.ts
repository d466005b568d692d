import type { LoopMetrics, StepMetrics } from '../model/metrics.js';

/**
 * LoopMetrics -> the JSON object of the one-loop calculator contract (DESIGN.md):
 * snake_case keys, infinities as "inf"/"-inf", missing or undefined values as null.
 * NaN never reaches the output; it becomes null.
 */

export type JsonNumber = number | 'inf' | '-inf' | null;

/** A number in contract form. */
export function jsonNumber(x: number | null | undefined): JsonNumber {
  if (x === null || x === undefined || Number.isNaN(x)) return null;
  if (x === Infinity) return 'inf';
  if (x === -Infinity) return '-inf';
  return x === 0 ? 0 : x;
}

/** A list of numbers in contract form. */
function jsonList(xs: readonly number[]): JsonNumber[] {
  return xs.map(jsonNumber);
}

/** Step metrics in contract form, or null. */
function stepJson(s: StepMetrics | null): Record<string, JsonNumber> | null {
  if (s === null) return null;
  return {
    overshoot_pct: jsonNumber(s.overshootPct),
    undershoot_pct: jsonNumber(s.undershootPct),
    rise_time_s: jsonNumber(s.riseTimeS),
    settling_time_s: jsonNumber(s.settlingTimeS),
    peak_time_s: jsonNumber(s.peakTimeS),
    final_value: jsonNumber(s.finalValue),
    peak_effort: jsonNumber(s.peakEffort),
  };
}

/** The calculator's JSON object for one loop (contract keys plus `warnings`). */
export function metricsToContractJson(m: LoopMetrics): Record<string, unknown> {
  return {
    stable: m.stable,
    closed_loop_poles: m.closedLoopPoles.map((p) => ({ re: jsonNumber(p.re), im: jsonNumber(p.im) })),
    closed_loop_dc_gain: jsonNumber(m.closedLoopDcGain),
    system_type: m.systemType,
    kp: jsonNumber(m.kp),
    kv: jsonNumber(m.kv),
    ka: jsonNumber(m.ka),
    gain_crossovers_rad_s: jsonList(m.gainCrossoversRadS),
    phase_margins_deg: jsonList(m.phaseMarginsDeg),
    phase_margin_deg: jsonNumber(m.phaseMarginDeg),
    phase_margin_at_rad_s: jsonNumber(m.phaseMarginAtRadS),
    phase_crossovers_rad_s: jsonList(m.phaseCrossoversRadS),
    gain_margins_db: jsonList(m.gainMarginsDb),
    gain_margin_db: jsonNumber(m.gainMarginDb),
    gain_margin_at_rad_s: jsonNumber(m.gainMarginAtRadS),
    gain_margin_upper_db: jsonNumber(m.gainMarginUpperDb),
    gain_margin_lower_db: jsonNumber(m.gainMarginLowerDb),
    delay_margin_s: jsonNumber(m.delayMarginS),
    peak_sensitivity: jsonNumber(m.peakSensitivity),
    peak_sensitivity_at_rad_s: jsonNumber(m.peakSensitivityAtRadS),
    peak_complementary: jsonNumber(m.peakComplementary),
    bandwidth_rad_s: jsonNumber(m.bandwidthRadS),
    step: stepJson(m.step),
    warnings: [...m.warnings],
  };
}
