import { UserError } from '../model/errors.js';
import type { LoopRow } from '../store/rows.js';
import { checkLoops } from './check.js';
import { findLoop, machineGraph, revisionInfo, type Core } from './core.js';
import type { LoopGraph } from './graph.js';
import { loopRef } from './names.js';
import { decodeState } from './state.js';
import type { AxisInfo, Headline, LoopDetail, LoopInfo, LoopResult, OverviewRow, Revision, RevisionInfo } from './types.js';

/** Read-only views for faces: lists, history, overview rows, loop detail. */

/** All axes with their loops. */
export function listAxes(core: Core): AxisInfo[] {
  const loops = core.sql.loops();
  return core.sql.axes().map((a) => ({
    name: a.name, note: a.note, author: a.author, createdAt: a.created_at,
    loops: loops.filter((l) => l.axis_id === a.id).map((l) => loopRef(l.axis, l.name)),
  }));
}

function info(graph: LoopGraph, l: LoopRow): LoopInfo {
  return {
    ref: loopRef(l.axis, l.name), axis: l.axis, name: l.name,
    inner: l.inner_loop_id === null ? null : graph.ref(l.inner_loop_id),
    outer: graph.outerOf(l.id).map((o) => graph.ref(o)),
    sampleRateHz: l.sample_rate_hz,
    head: revisionInfo(l, graph.head(l.id)),
  };
}

/** Every loop, by axis then name. */
export function listLoops(core: Core): LoopInfo[] {
  const graph = machineGraph(core);
  return [...graph.loops.values()].map((l) => info(graph, l));
}

/** One loop's identity and latest revision. */
export function loopInfo(core: Core, ref: string): LoopInfo {
  const l = findLoop(core, ref);
  const graph = machineGraph(core);
  return info(graph, graph.loop(l.id));
}

/** A loop's revisions, oldest first. */
export function loopLog(core: Core, ref: string): RevisionInfo[] {
  const l = findLoop(core, ref);
  return core.sql.log(l.id).map((r) => revisionInfo(l, r));
}

/** A revision with its state (default: the latest). */
export function loopRevision(core: Core, ref: string, number?: number): Revision {
  const l = findLoop(core, ref);
  const row = number === undefined ? core.sql.head(l.id) : core.sql.revision(l.id, number);
  if (!row) {
    const head = core.sql.head(l.id);
    throw new UserError(`${ref} has no revision ${number}; its revisions are 1 to ${head?.number ?? 0}`);
  }
  return { ...revisionInfo(l, row), state: decodeState(row.state_json) };
}

/** The worst of each headline metric over a loop's variants (smallest margins, largest peaks). */
export function headline(r: LoopResult): Headline {
  const ms = r.variants.flatMap((v) => (v.metrics === null ? [] : [v.metrics]));
  const pick = (values: (number | null | undefined)[], worst: 'min' | 'max'): number | null => {
    const xs = values.filter((x): x is number => typeof x === 'number' && !Number.isNaN(x));
    if (xs.length === 0) return null;
    return worst === 'min' ? Math.min(...xs) : Math.max(...xs);
  };
  return {
    phaseMarginDeg: pick(ms.map((m) => m.phaseMarginDeg), 'min'),
    // The reported gain margin nearest 0 dB over the variants, with its sign (negative: lower the gain).
    gainMarginDb: ms.reduce<number | null>((w, m) => (m.gainMarginDb !== null && (w === null || Math.abs(m.gainMarginDb) < Math.abs(w)) ? m.gainMarginDb : w), null),
    crossoverRadS: pick(ms.map((m) => (m.gainCrossoversRadS.length === 0 ? null : Math.max(...m.gainCrossoversRadS))), 'min'),
    bandwidthRadS: pick(ms.map((m) => m.bandwidthRadS), 'min'),
    peakSensitivity: pick(ms.map((m) => m.peakSensitivity), 'max'),
    overshootPct: pick(ms.map((m) => m.step?.overshootPct), 'max'),
  };
}

/** One row per loop with its fresh status and headline metrics. */
export async function overview(core: Core): Promise<OverviewRow[]> {
  const report = await checkLoops(core, null);
  const graph = machineGraph(core);
  const byRef = new Map(report.loops.map((r) => [r.loop, r]));
  return [...graph.loops.values()].flatMap((l) => {
    const ref = loopRef(l.axis, l.name);
    const r = byRef.get(ref);
    if (!r) return []; // added by another process after the check: shown on the next poll
    return [{
      loop: ref, axis: l.axis, name: l.name,
      inner: l.inner_loop_id === null ? null : graph.ref(l.inner_loop_id),
      head: revisionInfo(l, graph.head(l.id)), status: r.status, summary: r.summary,
      headline: headline(r), variants: r.variants.map((v) => v.variant),
    }];
  });
}

/** A loop's state, fresh result and history. */
export async function loopDetail(core: Core, ref: string): Promise<LoopDetail> {
  const report = await checkLoops(core, [ref]);
  const result = report.loops[0]!;
  const rev = loopRevision(core, ref, result.revision);
  return { info: loopInfo(core, ref), state: rev.state, result, history: loopLog(core, ref) };
}
