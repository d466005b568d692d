import type { Complex } from './tf.js';

/** Unit-step metrics of the unity-feedback loop (DESIGN.md, "Step metrics"). */
export interface StepMetrics {
  /** 100 (max y - y_f) / y_f, 0 when there is no overshoot. */
  readonly overshootPct: number;
  /** 100 (-min y) / y_f where y dips below 0, else 0. */
  readonly undershootPct: number;
  /** t90 - t10 (first upward crossings), seconds; null if never reached. */
  readonly riseTimeS: number | null;
  /** Last time y leaves y_f +/- 2 %, seconds. */
  readonly settlingTimeS: number | null;
  /** Time of the maximum, seconds; null when there is no overshoot. */
  readonly peakTimeS: number | null;
  /** y_f = T(0) exactly. */
  readonly finalValue: number;
  /** max |u| over the response, including the jump at t = 0+. */
  readonly peakEffort: number;
}

/**
 * Every metric of the one-loop calculator contract (DESIGN.md). Frequencies in rad/s,
 * margins in deg / dB, times in s. Infinity is allowed in memory; JSON writes "inf".
 * null = does not exist / does not apply.
 */
export interface LoopMetrics {
  readonly stable: boolean;
  readonly closedLoopPoles: readonly Complex[];
  readonly closedLoopDcGain: number;
  readonly systemType: number;
  readonly kp: number;
  readonly kv: number;
  readonly ka: number;
  readonly gainCrossoversRadS: readonly number[];
  readonly phaseMarginsDeg: readonly number[];
  readonly phaseMarginDeg: number | null;
  readonly phaseMarginAtRadS: number | null;
  readonly phaseCrossoversRadS: readonly number[];
  readonly gainMarginsDb: readonly number[];
  readonly gainMarginDb: number | null;
  readonly gainMarginAtRadS: number | null;
  readonly gainMarginUpperDb: number | null;
  readonly gainMarginLowerDb: number | null;
  readonly delayMarginS: number | null;
  readonly peakSensitivity: number;
  readonly peakSensitivityAtRadS: number | null;
  readonly peakComplementary: number;
  readonly bandwidthRadS: number | null;
  readonly step: StepMetrics | null;
  readonly warnings: readonly string[];
}
