/**
 * Key-by-key comparison of a calculator JSON object with one case of the reference
 * table (fixtures/reference/loops.json, written by scripts/reference/make_reference.py).
 * Every helper returns human-readable mismatch lines ("key: ours X vs reference Y"),
 * so a failing test names the case and every key that disagrees at once.
 */

export type JsonNum = number | 'inf' | '-inf' | null;

/** Tolerances used by test/reference.test.ts (the JSON records the same figures). */
export const TOL = {
  /** frequencies (rad/s) and margins (deg, dB, s), relative */
  rel: 1e-4,
  /** absolute floor for frequencies near zero, rad/s */
  freqFloorRadS: 1e-9,
  /** absolute floor for margins near zero, deg or dB (delay margin: s) */
  marginFloor: 1e-4,
  /** exact-by-coefficients values (Kp, Kv, Ka, T(0)), relative */
  exactRel: 1e-9,
  /** closed-loop poles of delay-free loops, relative to each pole's magnitude */
  poleRel: 1e-6,
  /** rightmost closed-loop pole where a delay is present (DESIGN.md allows approximate poles) */
  delayPoleRel: 2e-2,
  /** step rise, settling and peak times, relative */
  stepTimeRel: 1e-2,
  /** overshoot and undershoot, percentage points */
  shootPct: 0.2,
  /** final value and peak effort, relative */
  valueRel: 1e-3,
  /** with a delay the phase crossovers never end: both lists are compared up to this gain margin */
  delayGmListDb: 40,
} as const;

/** "inf"/"-inf" -> +-Infinity; numbers unchanged; anything else -> null. */
export function toNum(x: unknown): number | null {
  if (x === 'inf') return Infinity;
  if (x === '-inf') return -Infinity;
  return typeof x === 'number' ? x : null;
}

function show(x: unknown): string {
  return typeof x === 'number' ? x.toPrecision(10) : JSON.stringify(x);
}

/** One scalar: both null, both the same infinity, or |a-b| <= max(rel*|ref|, floor). */
export function compareScalar(key: string, ours: unknown, ref: unknown, rel: number, floor: number): string[] {
  const a = toNum(ours);
  const b = toNum(ref);
  if (a === null || b === null) {
    return ours === null && ref === null ? [] : [`${key}: ours ${show(ours)} vs reference ${show(ref)}`];
  }
  if (!Number.isFinite(b) || !Number.isFinite(a)) return a === b ? [] : [`${key}: ours ${show(ours)} vs reference ${show(ref)}`];
  const tol = Math.max(rel * Math.abs(b), floor);
  return Math.abs(a - b) <= tol ? [] : [`${key}: ours ${show(a)} vs reference ${show(b)} (tolerance ${tol.toExponential(1)})`];
}

/** Two parallel lists (frequency, value) sorted by frequency and compared element-wise. */
export function comparePairedLists(
  keys: [string, string],
  ours: [unknown, unknown],
  ref: [unknown, unknown],
  valueFloor: number,
  keep: (freq: number, value: number) => boolean = () => true,
): string[] {
  const pairs = (w: unknown, v: unknown): [number, number][] => {
    const ws = (w as unknown[]).map(toNum) as number[];
    const vs = (v as unknown[]).map(toNum) as number[];
    return ws.map((x, i): [number, number] => [x, vs[i]!]).filter(([x, y]) => keep(x, y)).sort((p, q) => p[0] - q[0]);
  };
  if (!Array.isArray(ours[0]) || !Array.isArray(ours[1])) return [`${keys[0]}: ours is not a list`];
  const a = pairs(ours[0], ours[1]);
  const b = pairs(ref[0], ref[1]);
  if (a.length !== b.length) {
    return [`${keys[0]}: ours [${a.map((p) => show(p[0])).join(', ')}] vs reference [${b.map((p) => show(p[0])).join(', ')}]`];
  }
  return b.flatMap(([w, v], i) => [
    ...compareScalar(`${keys[0]}[${i}]`, a[i]![0], w, TOL.rel, TOL.freqFloorRadS),
    ...compareScalar(`${keys[1]}[${i}]`, a[i]![1], v, TOL.rel, valueFloor),
  ]);
}

interface Pole {
  re: number;
  im: number;
}

/** Delay-free: the same multiset of poles (greedy nearest match), each within poleRel of its magnitude. */
export function comparePoleMultiset(ours: Pole[], ref: Pole[]): string[] {
  if (ours.length !== ref.length) return [`closed_loop_poles: ours ${ours.length} poles vs reference ${ref.length}`];
  const left = [...ours];
  const out: string[] = [];
  for (const p of ref) {
    let best = 0;
    for (let i = 1; i < left.length; i++) {
      if (Math.hypot(left[i]!.re - p.re, left[i]!.im - p.im) < Math.hypot(left[best]!.re - p.re, left[best]!.im - p.im)) best = i;
    }
    const q = left.splice(best, 1)[0]!;
    const err = Math.hypot(q.re - p.re, q.im - p.im);
    if (err > TOL.poleRel * Math.hypot(p.re, p.im)) {
      out.push(`closed_loop_poles: reference ${show(p.re)}${p.im >= 0 ? '+' : ''}${show(p.im)}j nearest ours ${show(q.re)}${q.im >= 0 ? '+' : ''}${show(q.im)}j`);
    }
  }
  return out;
}

/** With a delay: the rightmost pole (upper member of a pair) within delayPoleRel. */
export function compareRightmostPole(ours: Pole[], ref: Pole[]): string[] {
  const rightmost = (ps: Pole[]) => ps.filter((p) => p.im >= 0).sort((a, b) => b.re - a.re)[0];
  const a = rightmost(ours);
  const b = rightmost(ref)!;
  if (a === undefined) return ['closed_loop_poles: ours is empty (delay loop)'];
  const err = Math.hypot(a.re - b.re, a.im - b.im);
  return err <= TOL.delayPoleRel * Math.hypot(b.re, b.im)
    ? []
    : [`closed_loop_poles (rightmost, delay): ours ${show(a.re)}+${show(a.im)}j vs reference ${show(b.re)}+${show(b.im)}j`];
}

/** Step metrics object (or null) with the step tolerances. */
export function compareStep(ours: unknown, ref: unknown): string[] {
  if (ref === null || ours === null) return ref === ours ? [] : [`step: ours ${show(ours)} vs reference ${show(ref)}`];
  const a = ours as Record<string, unknown>;
  const b = ref as Record<string, unknown>;
  return [
    ...compareScalar('step.overshoot_pct', a.overshoot_pct, b.overshoot_pct, 0, TOL.shootPct),
    ...compareScalar('step.undershoot_pct', a.undershoot_pct, b.undershoot_pct, 0, TOL.shootPct),
    ...['rise_time_s', 'settling_time_s', 'peak_time_s'].flatMap((k) => compareScalar(`step.${k}`, a[k], b[k], TOL.stepTimeRel, 0)),
    ...['final_value', 'peak_effort'].flatMap((k) => compareScalar(`step.${k}`, a[k], b[k], TOL.valueRel, 0)),
  ];
}
