import { formatMetricValue, headline, type ChangeOutcome, type LoopResult } from '../engine/index.js';
import type { RequirementResult } from '../model/requirements.js';
import type { FreqUnit } from '../model/units.js';
import { statusText, table } from './output.js';

/** Presentation of check results: engine results -> display strings. No numerics beyond ranking. */

/**
 * The worst missed requirement: one whose value cannot be computed, else the one
 * furthest from its limit relative to the limit (so 20 % short of a phase
 * margin outranks 10 % over a peak sensitivity).
 */
export function worstFailure(failures: readonly RequirementResult[]): RequirementResult | null {
  let worst: RequirementResult | null = null;
  let worstMiss = -1;
  for (const f of failures) {
    const limit = f.requirement.value;
    const miss = f.value === null ? Infinity : Math.abs(f.value - limit) / (limit === 0 ? 1 : Math.abs(limit));
    if (miss > worstMiss) {
      worst = f;
      worstMiss = miss;
    }
  }
  return worst;
}

/** "pm 35.9deg < 45deg (loaded)", or why it has no value. */
export function failureText(f: RequirementResult, unit: FreqUnit, showVariant: boolean): string {
  const r = f.requirement;
  const tag = showVariant ? ` (${f.variant})` : '';
  if (f.value === null) return `${r.metric}: ${f.reason ?? 'no value'}${tag}`;
  const got = formatMetricValue(r.metric, f.value, unit);
  // A failed limit whose value still meets it failed for another reason (e.g. closed loop unstable).
  const meets = r.op === '>=' ? f.value >= r.value : f.value <= r.value;
  const rel = meets ? (f.reason ?? 'not met') : r.op === '>=' ? '<' : '>';
  return `${r.metric} ${got} ${rel} ${formatMetricValue(r.metric, r.value, unit)}${tag}`;
}

/** The last column of a check row: what is wrong, in a few words. */
export function problemText(r: LoopResult, unit: FreqUnit): string {
  switch (r.status) {
    case 'pass':
      return '';
    case 'fail': {
      const w = worstFailure(r.failures);
      if (w === null) return r.summary;
      const more = r.failures.length > 1 ? `; ${r.failures.length - 1} more` : '';
      return failureText(w, unit, r.variants.length > 1) + more;
    }
    default:
      return r.summary;
  }
}

/** The reported gain margin of the variant nearest to the edge, with its sign (negative: the gain must fall). */
function signedGainMargin(r: LoopResult): number | null {
  let best: number | null = null;
  for (const v of r.variants) {
    const g = v.metrics?.gainMarginDb ?? null;
    if (g !== null && (best === null || Math.abs(g) < Math.abs(best))) best = g;
  }
  return best;
}

/** Header and one row per loop: status word and mark, revision, PM, GM, crossover, bandwidth, worst miss. */
export function resultRows(results: readonly LoopResult[], unit: FreqUnit): string[] {
  const rows = results.map((r) => {
    const h = headline(r);
    return [
      r.loop, statusText(r.status), String(r.revision),
      formatMetricValue('pm', h.phaseMarginDeg, unit), formatMetricValue('gm', signedGainMargin(r), unit),
      formatMetricValue('fc', h.crossoverRadS, unit), formatMetricValue('bw', h.bandwidthRadS, unit),
      problemText(r, unit),
    ];
  });
  return table([['loop', 'status', 'rev', 'PM', 'GM', 'fc', 'bw', 'worst miss'], ...rows], [2, 3, 4, 5, 6]);
}

/** What a change did: the new revision, then the recheck of the loop and of every loop built on it. */
export function outcomeLines(o: ChangeOutcome, unit: FreqUnit): string[] {
  const r = o.revision;
  return [`${r.loop}: revision ${r.number} saved by ${r.author} (${r.summary})`, ...resultRows(o.results, unit).map((l) => `  ${l}`)];
}
