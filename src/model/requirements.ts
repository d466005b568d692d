/**
 * Requirements: one limit on one metric of a loop. Values are stored in base
 * units (deg, dB, rad/s, s, ratio, percent, 1/s^n for error constants); the text
 * the user typed is kept for display.
 */
export type MetricKey =
  | 'pm' // phase margin, deg (every crossover, |PM|)
  | 'gm' // gain margin, dB (|GM| of the reported margin)
  | 'fc' // gain-crossover frequency, rad/s
  | 'bw' // closed-loop bandwidth, rad/s
  | 'ms' // peak sensitivity, ratio
  | 'mt' // peak complementary sensitivity, ratio
  | 'dm' // delay margin, s
  | 'os' // overshoot, percent
  | 'tr' // rise time 10-90 %, s
  | 'ts' // settling time 2 %, s
  | 'kp' // position error constant
  | 'kv' // velocity error constant, 1/s
  | 'ka' // acceleration error constant, 1/s^2
  | 'effort' // peak control effort per unit step
  | 'hf' // compensator high-frequency gain |C(j inf)|, ratio
  | 'sep'; // bandwidth ratio outer/inner loop

export type Comparison = '>=' | '<=';

export interface Requirement {
  readonly metric: MetricKey;
  readonly op: Comparison;
  /** In base units (see MetricKey). */
  readonly value: number;
  /** As typed, e.g. "fc>=80Hz". */
  readonly text: string;
}

/** The outcome of one requirement on one plant variant. */
export interface RequirementResult {
  readonly requirement: Requirement;
  readonly variant: string;
  /** The measured value in base units; null when it cannot be computed (say why in `reason`). */
  readonly value: number | null;
  readonly pass: boolean;
  readonly reason?: string;
}

export type LoopStatus = 'pass' | 'fail' | 'unstable' | 'error';

/** Status as a single-width ASCII glyph, always shown next to the word (never colour alone); one table for every face. */
export const STATUS_GLYPH: Readonly<Record<LoopStatus, string>> = { pass: '+', fail: 'x', unstable: '!', error: '?' };
