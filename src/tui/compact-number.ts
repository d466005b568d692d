import { formatNumber } from '../model/units.js';

/**
 * A number in at most `width` cells for a table column: three significant
 * digits when they fit, fewer when not, then a short exponent ("1e-3",
 * "2e9"); a tiny value that still does not fit shows as 0.
 */
export function compactNumber(x: number, width: number): string {
  for (const digits of [3, 2, 1]) {
    const s = formatNumber(x, digits).replace('e+', 'e');
    if (s.length <= width) return s;
  }
  for (const digits of [2, 1, 0]) {
    const e = x.toExponential(digits).replace('e+', 'e');
    if (e.length <= width) return e;
  }
  if (Math.abs(x) < 1) return x < 0 ? '-0' : '0';
  return x > 0 ? '>' + '9'.repeat(width - 1) : '<-' + '9'.repeat(Math.max(0, width - 2));
}
