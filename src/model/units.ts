import { UserError } from './errors.js';

/** How a store shows frequencies. Inside and in JSON everything is rad/s. */
export type FreqUnit = 'hz' | 'rad';

const TWO_PI = 2 * Math.PI;

/** Splits "30Hz", "2.5 kHz", "-6dB" into a finite number and a lower-case suffix. */
export function splitNumberSuffix(text: string, what: string): { value: number; suffix: string } {
  const m = /^\s*([+-]?(?:\d+\.?\d*|\.\d+)(?:e[+-]?\d+)?)\s*([a-z%/]*)\s*$/i.exec(text);
  if (!m) throw new UserError(`${what}: '${text}' is not a number with an optional unit (e.g. 30Hz, 45deg, 50ms)`);
  const value = Number(m[1]);
  if (!Number.isFinite(value)) throw new UserError(`${what}: '${text}' is not a finite number`);
  return { value, suffix: (m[2] ?? '').toLowerCase() };
}

/** Parses a frequency; accepts Hz, kHz, rad/s (or rad) suffixes; a bare number is in `defaultUnit`. */
export function parseFrequencyRadS(text: string, defaultUnit: FreqUnit, what = 'frequency'): number {
  const { value, suffix } = splitNumberSuffix(text, what);
  let w: number;
  switch (suffix) {
    case '': w = defaultUnit === 'hz' ? value * TWO_PI : value; break;
    case 'hz': w = value * TWO_PI; break;
    case 'khz': w = value * 1e3 * TWO_PI; break;
    case 'rad/s': case 'rad': case 'rads': w = value; break;
    default: throw new UserError(`${what}: unknown unit '${suffix}' in '${text}'; use Hz, kHz or rad/s`);
  }
  if (!(w > 0)) throw new UserError(`${what}: '${text}' must be above zero`);
  return w;
}

/** Parses a duration; accepts s, ms, us suffixes; a bare number is in seconds. */
export function parseTimeS(text: string, what = 'time'): number {
  const { value, suffix } = splitNumberSuffix(text, what);
  const scale: Record<string, number> = { '': 1, s: 1, ms: 1e-3, us: 1e-6 };
  const k = scale[suffix];
  if (k === undefined) throw new UserError(`${what}: unknown unit '${suffix}' in '${text}'; use s, ms or us`);
  if (!(value >= 0)) throw new UserError(`${what}: '${text}' must not be negative`);
  return value * k;
}

/** A number in at most `digits` significant figures, without trailing zeros ("1.5", "2.5e+04"). */
export function formatNumber(x: number, digits = 4): string {
  if (x === Infinity) return 'inf';
  if (x === -Infinity) return '-inf';
  if (Number.isNaN(x)) return '?';
  if (x === 0) return '0';
  const a = Math.abs(x);
  if (a >= 1e-3 && a < 1e6) return String(Number(x.toPrecision(digits)));
  return x.toExponential(digits - 1).replace(/\.?0+e/, 'e');
}

/** Converts rad/s to the display unit's number. */
export function toDisplayFrequency(wRadS: number, unit: FreqUnit): number {
  return unit === 'hz' ? wRadS / TWO_PI : wRadS;
}

/** "47.75Hz" or "300rad/s": a frequency in the display unit with its suffix, re-readable by parseFrequencyRadS. */
export function formatFrequency(wRadS: number, unit: FreqUnit, digits = 4): string {
  return formatNumber(toDisplayFrequency(wRadS, unit), digits) + (unit === 'hz' ? 'Hz' : 'rad/s');
}

/** "12.5ms", "3.2s", "80us". */
export function formatTime(tS: number, digits = 3): string {
  if (!Number.isFinite(tS)) return formatNumber(tS);
  const a = Math.abs(tS);
  if (a === 0) return '0s';
  if (a < 1e-3) return formatNumber(tS * 1e6, digits) + 'us';
  if (a < 1) return formatNumber(tS * 1e3, digits) + 'ms';
  return formatNumber(tS, digits) + 's';
}
