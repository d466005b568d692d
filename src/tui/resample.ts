/**
 * Reading a sampled curve at the columns of a sketch: straight lines between
 * samples, ends held. Display work only: it picks what each column shows.
 */

/** Values at `at` of the curve through (xs[i], values[i]); `xs` and `at` increasing. */
export function resample(xs: readonly number[], values: readonly number[], at: readonly number[]): number[] {
  let k = 0;
  return at.map((x) => {
    while (k < xs.length - 2 && xs[k + 1]! < x) k++;
    const x0 = xs[k]!;
    const x1 = xs[Math.min(k + 1, xs.length - 1)]!;
    const v0 = values[k]!;
    const v1 = values[Math.min(k + 1, values.length - 1)]!;
    if (x1 === x0 || x <= x0) return v0;
    if (x >= x1) return v1;
    return v0 + ((v1 - v0) * (x - x0)) / (x1 - x0);
  });
}

/** The same with straight lines in log-frequency (a Bode plot's own axis). */
export function resampleLog(wRadS: readonly number[], values: readonly number[], grid: readonly number[]): number[] {
  return resample(wRadS.map(Math.log10), values, grid.map(Math.log10));
}

/**
 * Like `resampleLog`, but a column whose frequency span holds a sample further
 * from the straight line shows that sample: a lightly damped resonance or a
 * notch narrower than one column stays visible instead of falling between columns.
 */
export function resampleLogKeepingPeaks(wRadS: readonly number[], values: readonly number[], grid: readonly number[]): number[] {
  const out = resampleLog(wRadS, values, grid);
  if (grid.length < 2) return out;
  const a = Math.log10(grid[0]!);
  const step = (Math.log10(grid[grid.length - 1]!) - a) / (grid.length - 1);
  const base = [...out];
  wRadS.forEach((w, j) => {
    const i = Math.round((Math.log10(w) - a) / step);
    const v = values[j]!;
    if (i < 0 || i >= out.length || !Number.isFinite(v)) return;
    if (Math.abs(v - base[i]!) > Math.abs(out[i]! - base[i]!)) out[i] = v;
  });
  return out;
}
