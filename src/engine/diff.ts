import type { LoopMetrics } from '../model/metrics.js';
import type { FreqUnit } from '../model/units.js';
import { formatBlock } from './block-syntax.js';
import { axisGraph, findLoop, revisionInfo, type Core } from './core.js';
import { UserError } from '../model/errors.js';
import { loadEvaluator, recheck, type StateOverride } from './recheck.js';
import { formatRequirement } from './requirement-syntax.js';
import { decodeState, requirementKey, variantOrder } from './state.js';
import type { LoopDiff, LoopResult, LoopState, MetricDelta, StateChange } from './types.js';

/** The metrics a diff compares, in display order. */
const DIFF_METRICS: readonly [string, (m: LoopMetrics) => number | null | undefined][] = [
  ['phaseMarginDeg', (m) => m.phaseMarginDeg],
  ['gainMarginDb', (m) => m.gainMarginDb],
  ['crossoverRadS', (m) => (m.gainCrossoversRadS.length === 0 ? null : Math.max(...m.gainCrossoversRadS))],
  ['delayMarginS', (m) => m.delayMarginS],
  ['peakSensitivity', (m) => m.peakSensitivity],
  ['peakComplementary', (m) => m.peakComplementary],
  ['bandwidthRadS', (m) => m.bandwidthRadS],
  ['kv', (m) => m.kv],
  ['step.overshootPct', (m) => m.step?.overshootPct],
  ['step.riseTimeS', (m) => m.step?.riseTimeS],
  ['step.settlingTimeS', (m) => m.step?.settlingTimeS],
  ['step.peakEffort', (m) => m.step?.peakEffort],
];

/** What changed in the state, item by item; texts in the store's unit. */
export function stateChanges(a: LoopState, b: LoopState, unit: FreqUnit): StateChange[] {
  const out: StateChange[] = [];
  for (const v of variantOrder([...Object.keys(a.plants), ...Object.keys(b.plants)])) {
    const x = a.plants[v]?.text ?? null;
    const y = b.plants[v]?.text ?? null;
    if (x !== y || JSON.stringify(a.plants[v]?.tf) !== JSON.stringify(b.plants[v]?.tf)) out.push({ what: 'plant', key: v, from: x, to: y });
  }
  const reqA = new Map(a.requirements.map((r) => [requirementKey(r), formatRequirement(r, unit)]));
  const reqB = new Map(b.requirements.map((r) => [requirementKey(r), formatRequirement(r, unit)]));
  for (const k of new Set([...reqA.keys(), ...reqB.keys()])) {
    const x = reqA.get(k) ?? null;
    const y = reqB.get(k) ?? null;
    if (x !== y) out.push({ what: 'requirement', key: k, from: x, to: y });
  }
  const comp = (s: LoopState) => (s.compensator.blocks.map((bl) => formatBlock(bl, unit)).join(' ') || '(unity gain)') + (s.compensator.ideal ? ' (ideal)' : '');
  if (comp(a) !== comp(b)) out.push({ what: 'compensator', key: null, from: comp(a), to: comp(b) });
  return out;
}

function deltas(ra: LoopResult, rb: LoopResult): MetricDelta[] {
  const out: MetricDelta[] = [];
  const names = [...new Set([...rb.variants.map((v) => v.variant), ...ra.variants.map((v) => v.variant)])];
  for (const variant of names) {
    const ma = ra.variants.find((v) => v.variant === variant)?.metrics ?? null;
    const mb = rb.variants.find((v) => v.variant === variant)?.metrics ?? null;
    for (const [metric, get] of DIFF_METRICS) {
      const from = ma === null ? null : (get(ma) ?? null);
      const to = mb === null ? null : (get(mb) ?? null);
      if (from === null && to === null) continue;
      const d = from !== null && to !== null ? to - from : null;
      out.push({ variant, metric, from, to, delta: d === null || Number.isNaN(d) ? null : d });
    }
  }
  return out;
}

/**
 * Compares two revisions of a loop: the state items that changed, and the
 * metrics of both analysed with today's inner loops (so the deltas show the
 * effect of this loop's change alone). Results are stored like any other.
 */
export async function diffRevisions(core: Core, ref: string, a: number, b: number): Promise<LoopDiff> {
  const loop = findLoop(core, ref);
  const rowA = core.sql.revision(loop.id, a);
  const rowB = core.sql.revision(loop.id, b);
  const head = core.sql.head(loop.id)!;
  for (const [n, row] of [[a, rowA], [b, rowB]] as const) {
    if (!row) throw new UserError(`${ref} has no revision ${n}; its revisions are 1 to ${head.number}`);
  }
  const ev = await loadEvaluator();
  const [resA, resB] = core.sql.writeTx(() => {
    const graph = axisGraph(core, loop.axis_id);
    const run = (row: NonNullable<typeof rowA>): LoopResult => {
      const ov: StateOverride = { state: decodeState(row.state_json), revision: row.number, inputHash: graph.inputHash(loop.id, row.state_hash) };
      return recheck({ sql: core.sql, graph, ev, computedAt: core.now(), store: true, overrides: new Map([[loop.id, ov]]) }, [loop.id]).get(loop.id)!;
    };
    return [run(rowA!), run(rowB!)];
  });
  return {
    loop: ref,
    from: revisionInfo(loop, rowA!),
    to: revisionInfo(loop, rowB!),
    changes: stateChanges(decodeState(rowA!.state_json), decodeState(rowB!.state_json), core.unit()),
    statusFrom: resA.status,
    statusTo: resB.status,
    metrics: deltas(resA, resB),
  };
}
