/**
 * sqrt(x^2 + y^2) without overflow, equal bit for bit to Math.hypot(x, y) on
 * Node's V8: the same steps (scale by the larger magnitude, sum the squares,
 * square root, scale back) without the builtin's per-call argument array and
 * runtime call, which made Math.hypot a tenth of a loop analysis. Equality
 * with Math.hypot is tested on millions of inputs, so swapping it in changes
 * no stored result.
 */
export function hypot2(x: number, y: number): number {
  const a = Math.abs(x);
  const b = Math.abs(y);
  if (a === Infinity || b === Infinity) return Infinity;
  if (a !== a || b !== b) return Number.NaN;
  const m = a > b ? a : b;
  if (m === 0) return 0;
  const p = a / m;
  const q = b / m;
  return Math.sqrt(p * p + q * q) * m;
}
