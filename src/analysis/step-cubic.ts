/**
 * Cubic Hermite pieces on the unit interval: p(s) = c0 + c1 s + c2 s^2 + c3 s^3 through
 * values and slopes at both ends of one simulation step. With exact values and slopes
 * the interpolation error is O(h^4), so peaks and level crossings found on the pieces
 * are far more accurate than the samples alone.
 */

export type Cubic = [number, number, number, number];

/** The Hermite cubic with p(0) = y0, p(1) = y1, p'(0) = s0, p'(1) = s1 (slopes per unit s, i.e. h times d/dt). */
export function hermiteCubic(y0: number, y1: number, s0: number, s1: number, out: Cubic = [0, 0, 0, 0]): Cubic {
  out[0] = y0;
  out[1] = s0;
  out[2] = 3 * (y1 - y0) - 2 * s0 - s1;
  out[3] = 2 * (y0 - y1) + s0 + s1;
  return out;
}

/** p(s) by Horner. */
export function cubicAt(c: Cubic, s: number): number {
  return c[0] + s * (c[1] + s * (c[2] + s * c[3]));
}

/** Roots of p'(s) = c1 + 2 c2 s + 3 c3 s^2 strictly inside (0, 1), ascending; writes into out and returns the count. */
export function cubicCriticalPoints(c: Cubic, out: Float64Array): number {
  const a = 3 * c[3];
  const b = 2 * c[2];
  const k = c[1];
  const scale = Math.abs(a) + Math.abs(b) + Math.abs(k);
  if (scale === 0) return 0;
  let r1: number, r2: number;
  if (Math.abs(a) <= 1e-14 * scale) {
    if (b === 0) return 0;
    r1 = r2 = -k / b;
  } else {
    const disc = b * b - 4 * a * k;
    if (disc < 0) return 0;
    // Stable quadratic roots: q = -(b + sign(b) sqrt(disc)) / 2, roots q/a and k/q.
    const q = -0.5 * (b + (b >= 0 ? 1 : -1) * Math.sqrt(disc));
    r1 = q / a;
    r2 = q !== 0 ? k / q : r1;
    if (r1 > r2) { const t = r1; r1 = r2; r2 = t; }
  }
  let cnt = 0;
  if (r1 > 0 && r1 < 1) out[cnt++] = r1;
  if (r2 !== r1 && r2 > 0 && r2 < 1) out[cnt++] = r2;
  return cnt;
}

const scratch = new Float64Array(2);

/** Extremes of a piece: written into one shared object, as the scans call this for every step. */
export interface CubicRange { min: number; sMin: number; max: number; sMax: number }

const range: CubicRange = { min: 0, sMin: 0, max: 0, sMax: 0 };

/** Max and min of p over [0, 1] with their places (the returned object is reused by the next call). */
export function cubicRange(c: Cubic): CubicRange {
  let min = c[0], sMin = 0, max = c[0], sMax = 0;
  const end = c[0] + c[1] + c[2] + c[3];
  if (end > max) { max = end; sMax = 1; }
  if (end < min) { min = end; sMin = 1; }
  const cnt = cubicCriticalPoints(c, scratch);
  for (let i = 0; i < cnt; i++) {
    const s = scratch[i]!;
    const v = cubicAt(c, s);
    if (v > max) { max = v; sMax = s; }
    if (v < min) { min = v; sMin = s; }
  }
  range.min = min; range.sMin = sMin; range.max = max; range.sMax = sMax;
  return range;
}

/** Root of p - level on [a, b] where the sign changes, by safeguarded regula falsi (Illinois). */
function rootOn(c: Cubic, level: number, a: number, b: number): number {
  let fa = cubicAt(c, a) - level;
  let fb = cubicAt(c, b) - level;
  if (fa === 0) return a;
  if (fb === 0) return b;
  let side = 0;
  for (let it = 0; it < 60; it++) {
    const s = (a * fb - b * fa) / (fb - fa);
    const fs = cubicAt(c, s) - level;
    if (fs === 0 || b - a < 1e-15) return s;
    if ((fs > 0) === (fb > 0)) {
      b = s; fb = fs;
      if (side === -1) fa /= 2;
      side = -1;
    } else {
      a = s; fa = fs;
      if (side === 1) fb /= 2;
      side = 1;
    }
  }
  return (a + b) / 2;
}

const breaks = new Float64Array(4);

/** Monotone pieces of [0, 1]: breakpoints 0, critical points, 1, written into breaks; returns their count. */
function pieces(c: Cubic): number {
  const cnt = cubicCriticalPoints(c, scratch);
  breaks[0] = 0;
  for (let i = 0; i < cnt; i++) breaks[i + 1] = scratch[i]!;
  breaks[cnt + 1] = 1;
  return cnt + 2;
}

/** Smallest s in [0, 1] where p rises from below level to level, or -1 if it never does. */
export function cubicFirstUpCrossing(c: Cubic, level: number): number {
  const nb = pieces(c);
  for (let i = 0; i + 1 < nb; i++) {
    const a = breaks[i]!, b = breaks[i + 1]!;
    if (cubicAt(c, a) < level && cubicAt(c, b) >= level) return rootOn(c, level, a, b);
  }
  return -1;
}

/** Largest s in [0, 1] where p equals level (a sign change of p - level), or -1. */
export function cubicLastCrossing(c: Cubic, level: number): number {
  const nb = pieces(c);
  for (let i = nb - 2; i >= 0; i--) {
    const a = breaks[i]!, b = breaks[i + 1]!;
    const fa = cubicAt(c, a) - level, fb = cubicAt(c, b) - level;
    if ((fa <= 0 && fb >= 0) || (fa >= 0 && fb <= 0)) return rootOn(c, level, a, b);
  }
  return -1;
}
