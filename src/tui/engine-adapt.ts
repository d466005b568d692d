import type { LoopDetail, LoopResult, OverviewRow, RevisionInfo } from '../engine/index.js';
import type { LoopMetrics } from '../model/metrics.js';
import type { RequirementResult } from '../model/requirements.js';
import type { CheckVM, HeadlineVM, MissVM, OverviewRowVM, RevisionVM, VariantVM } from './view-model.js';

/** Engine shapes -> view models. Only renaming and picking; no numbers are computed here. */

/** A variant's headline: the reported margins and the highest crossover, as the engine's overview takes them. */
export function variantHeadline(m: LoopMetrics | null): HeadlineVM {
  if (m === null) return { pmDeg: null, gmDb: null, crossoverRadS: null, bandwidthRadS: null, peakSensitivity: null };
  return {
    pmDeg: m.phaseMarginDeg,
    gmDb: m.gainMarginDb,
    crossoverRadS: m.gainCrossoversRadS.length === 0 ? null : Math.max(...m.gainCrossoversRadS),
    bandwidthRadS: m.bandwidthRadS,
    peakSensitivity: m.peakSensitivity,
  };
}

/** Every variant of a result. */
export function variantsOf(r: LoopResult): VariantVM[] {
  return r.variants.map((v) => ({
    name: v.variant,
    stable: v.metrics?.stable ?? false,
    ...(v.error !== undefined ? { error: v.error } : {}),
    headline: variantHeadline(v.metrics),
  }));
}

/** One requirement result as a checklist row. */
export function checkOf(x: RequirementResult): CheckVM {
  return {
    metric: x.requirement.metric, op: x.requirement.op, limit: x.requirement.value,
    variant: x.variant, value: x.value, pass: x.pass,
    ...(x.reason !== undefined ? { reason: x.reason } : {}),
  };
}

/** Every requirement of every variant. */
export function checksOf(r: LoopResult): CheckVM[] {
  return r.variants.flatMap((v) => v.requirements.map(checkOf));
}

/** The engine's first failure (the one its summary names), with how many more there are. */
export function missOf(r: LoopResult | undefined): MissVM | null {
  const f = r?.failures[0];
  if (!f) return null;
  return {
    metric: f.requirement.metric, op: f.requirement.op, limit: f.requirement.value, value: f.value,
    variant: (r?.variants.length ?? 0) > 1 ? f.variant : '', more: r!.failures.length - 1,
    ...(f.reason !== undefined ? { reason: f.reason } : {}),
  };
}

/** Overview rows; `outerId` from the engine's `inner` links, failures from the check report. */
export function overviewRowsOf(rows: readonly OverviewRow[], results: ReadonlyMap<string, LoopResult>): OverviewRowVM[] {
  const outer = new Map<string, string>();
  for (const r of rows) if (r.inner !== null) outer.set(r.inner, r.loop);
  return rows.map((r) => {
    const result = results.get(r.loop);
    const error = result?.variants.find((v) => v.error !== undefined)?.error;
    return {
      id: r.loop, axis: r.axis, name: r.name, outerId: outer.get(r.loop) ?? null,
      revision: r.head.number, status: r.status, summary: r.summary,
      ...(error !== undefined ? { error } : {}),
      headline: {
        pmDeg: r.headline.phaseMarginDeg, gmDb: r.headline.gainMarginDb, crossoverRadS: r.headline.crossoverRadS,
        bandwidthRadS: r.headline.bandwidthRadS, peakSensitivity: r.headline.peakSensitivity,
      },
      worstMiss: missOf(result),
    };
  });
}

/** A revision for the history list with a status: the one it was saved with unless another is given. */
export function revisionOf(r: RevisionInfo, status: RevisionVM['status'] = r.status): RevisionVM {
  return { revision: r.number, author: r.author, at: r.time, note: r.note, kind: r.kind, status };
}

/**
 * History newest first, each revision with the status it was saved with; a head
 * saved without one (loaded from a dump) shows the loop's current status.
 */
export function historyOf(d: LoopDetail): RevisionVM[] {
  return [...d.history].reverse().map((r) => revisionOf(r, r.status ?? (r.number === d.result.revision ? d.result.status : null)));
}
