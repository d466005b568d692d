import type { FreqUnit } from '../model/units.js';
import { toDisplayFrequency } from '../model/units.js';
import { compactNumber } from './compact-number.js';
import { formatMetricValue } from '../engine/requirement-syntax.js';
import type { LoopStatus } from '../model/requirements.js';
import { cleanText } from './sanitize.js';
import { statusLabel, STATUS_LABEL_WIDTH } from './status.js';
import { layoutColumns, tableLine, type Column } from './table.js';
import { truncate } from './text.js';
import type { MissVM, OverviewRowVM, OverviewVM } from './view-model.js';
import { formatWhen } from './when.js';

/** A loop row placed in the tree: its depth under the outermost loop of its axis. */
export interface PlacedRow {
  readonly row: OverviewRowVM;
  readonly depth: number;
}

/**
 * Orders rows by axis (first appearance), each outermost loop followed by the
 * loops nested inside it, depth first. A loop whose outer loop is missing (or a
 * cycle) is treated as outermost, so no row is ever lost.
 */
export function placeRows(rows: readonly OverviewRowVM[]): PlacedRow[] {
  const ids = new Set(rows.map((r) => r.id));
  const children = new Map<string, OverviewRowVM[]>();
  for (const r of rows) {
    if (r.outerId !== null && ids.has(r.outerId)) children.set(r.outerId, [...(children.get(r.outerId) ?? []), r]);
  }
  const out: PlacedRow[] = [];
  const seen = new Set<string>();
  const visit = (r: OverviewRowVM, depth: number) => {
    if (seen.has(r.id)) return;
    seen.add(r.id);
    out.push({ row: r, depth });
    for (const c of children.get(r.id) ?? []) visit(c, depth + 1);
  };
  const axes = [...new Set(rows.map((r) => r.axis))];
  for (const axis of axes) {
    for (const r of rows) if (r.axis === axis && (r.outerId === null || !ids.has(r.outerId))) visit(r, 0);
    for (const r of rows) if (r.axis === axis) visit(r, 0); // cycles: whatever is left
  }
  return out;
}

/** Keeps rows whose "axis/name" contains `text` (any case) and, with `failingOnly`, that do not pass. */
export function filterRows(rows: readonly PlacedRow[], text: string, failingOnly: boolean): PlacedRow[] {
  const needle = text.trim().toLowerCase();
  return rows.filter(
    ({ row }) =>
      (!failingOnly || row.status !== 'pass') &&
      (needle === '' || `${row.axis}/${row.name}`.toLowerCase().includes(needle)),
  );
}

/** Counts of loops per status. */
export function statusCounts(rows: readonly OverviewRowVM[]): Record<LoopStatus, number> {
  const n: Record<LoopStatus, number> = { pass: 0, fail: 0, unstable: 0, error: 0 };
  for (const r of rows) n[r.status]++;
  return n;
}

/** The two header lines: machine, store and counts; the last change. */
export function overviewHeader(vm: OverviewVM, width: number, nowMs: number): string[] {
  const n = statusCounts(vm.rows);
  const counts = `${vm.rows.length} loops: ${n.pass} pass, ${n.fail} fail, ${n.unstable} unstable` + (n.error ? `, ${n.error} error` : '');
  const first = `${cleanText(vm.machine)}  [${cleanText(vm.storePath)}]  ${counts}`;
  const lc = vm.lastChange;
  const second = lc
    ? `last change: ${cleanText(lc.loopId)} r${lc.revision} by ${cleanText(lc.author)}, ${formatWhen(lc.at, nowMs)}${lc.note === "" ? "" : ": " + cleanText(lc.note)}`
    : 'last change: none yet';
  return [truncate(first, width), truncate(second, width)];
}

/** "pm 31.2 < 45deg (loaded) +2": a missed requirement in a few words (the unit once), and how many more also miss. */
export function missText(m: MissVM, unit: FreqUnit): string {
  const where = m.variant !== '' ? ` (${cleanText(m.variant)})` : '';
  const more = m.more > 0 ? ` +${m.more}` : '';
  if (m.value === null) return `${m.metric}: ${cleanText(m.reason ?? 'cannot be computed')}${where}${more}`;
  const rel = m.op === '>=' ? '<' : '>';
  const limit = formatMetricValue(m.metric, m.limit, unit);
  const value = formatMetricValue(m.metric, m.value, unit);
  const suffix = /[^\d.]*$/.exec(limit)![0];
  const bare = suffix !== '' && value.endsWith(suffix) && /\d$/.test(value.slice(0, -suffix.length)) ? value.slice(0, -suffix.length) : value;
  return `${m.metric} ${bare} ${rel} ${limit}${where}${more}`;
}

const num = (x: number | null, width: number) => (x === null ? '-' : compactNumber(x, width));
const freq = (w: number | null, unit: FreqUnit) => (w === null ? '-' : compactNumber(toDisplayFrequency(w, unit), 6));

/** The overview columns for a display unit. */
function columns(unit: FreqUnit): { fixed: Column<PlacedRow>[]; flex: Column<PlacedRow> } {
  const u = unit === 'hz' ? 'Hz' : 'r/s';
  return {
    fixed: [
      { title: 'status', width: STATUS_LABEL_WIDTH, align: 'left', cell: ({ row }) => statusLabel(row.status) },
      { title: 'loop', width: 11, align: 'left', cell: ({ row, depth }) => (depth > 0 ? ' '.repeat(2 * (depth - 1)) + '└ ' : '') + cleanText(row.name) },
      { title: 'rev', width: 4, align: 'right', dropPriority: 2, cell: ({ row }) => `r${row.revision}` },
      { title: 'PM deg', width: 6, align: 'right', cell: ({ row }) => num(row.headline.pmDeg, 6) },
      { title: 'GM dB', width: 5, align: 'right', cell: ({ row }) => num(row.headline.gmDb, 5) },
      { title: `fc ${u}`, width: 6, align: 'right', dropPriority: 4, cell: ({ row }) => freq(row.headline.crossoverRadS, unit) },
      { title: `bw ${u}`, width: 6, align: 'right', dropPriority: 3, cell: ({ row }) => freq(row.headline.bandwidthRadS, unit) },
      { title: 'Ms', width: 4, align: 'right', dropPriority: 1, cell: ({ row }) => num(row.headline.peakSensitivity, 4) },
    ],
    flex: {
      title: 'worst miss',
      width: 0,
      align: 'left',
      cell: ({ row }) =>
        row.status === 'pass' ? '' : row.status === 'fail' && row.worstMiss ? missText(row.worstMiss, unit) : cleanText(row.error ?? row.summary),
    },
  };
}

/** One line of the loop table: an axis heading (id null) or a loop (its id and status). */
export interface OverviewLine {
  readonly text: string;
  readonly id: string | null;
  readonly status: LoopStatus | null;
}

/** The column titles and the body lines (axis headings and loop rows) for `width` cells. */
export function overviewTable(rows: readonly PlacedRow[], unit: FreqUnit, width: number): { titles: string; body: OverviewLine[] } {
  const { fixed, flex } = columns(unit);
  // Two cells on the left are kept for the selection marker.
  const cols = layoutColumns(fixed, flex, width - 2);
  const body: OverviewLine[] = [];
  let axis: string | null = null;
  for (const p of rows) {
    if (p.row.axis !== axis) {
      axis = p.row.axis;
      body.push({ text: truncate(`axis ${cleanText(axis)}`, width - 2), id: null, status: null });
    }
    body.push({ text: tableLine(cols, p), id: p.row.id, status: p.row.status });
  }
  return { titles: tableLine(cols, null), body };
}

/** The overview as plain text lines: for a pipe, a log, or a terminal without raw mode. */
export function overviewPlain(vm: OverviewVM, width: number, nowMs: number): string[] {
  const placed = placeRows(vm.rows);
  const { titles, body } = overviewTable(placed, vm.unit, width);
  const lines = [...overviewHeader(vm, width, nowMs), '', '  ' + titles, ...body.map((l) => '  ' + l.text)];
  if (vm.rows.length === 0) lines.push('  no loops yet: add one with `loopledger loop add AXIS/LOOP --plant EXPR`');
  return lines.map((l) => l.trimEnd());
}
