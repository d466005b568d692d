import { STATUS_GLYPH, type LoopStatus } from '../model/requirements.js';

/**
 * Output helpers shared by the commands: JSON in the product's conventions and
 * plain aligned tables. Pure string building; no numerics.
 */

/** "x fail" */
export function statusText(s: LoopStatus): string {
  return `${STATUS_GLYPH[s]} ${s}`;
}

/** Keys whose values are maps keyed by data (variant names, statuses): their keys are kept as they are. */
const DATA_MAPS = new Set(['plants', 'counts']);

/** camelCase -> snake_case: crossoverRadS -> crossover_rad_s, delayMarginS -> delay_margin_s. */
export function snakeKey(k: string): string {
  return k.replace(/([a-z0-9])([A-Z])/g, '$1_$2').replace(/([A-Z])([A-Z][a-z])/g, '$1_$2').toLowerCase();
}

/** Converts a value for JSON output: snake_case keys, infinities as "inf"/"-inf", NaN as null. */
export function jsonValue(v: unknown, keepKeys = false): unknown {
  if (typeof v === 'number') {
    if (v === Infinity) return 'inf';
    if (v === -Infinity) return '-inf';
    return Number.isNaN(v) ? null : v;
  }
  if (v === undefined) return null;
  if (v === null || typeof v !== 'object') return v;
  if (Array.isArray(v)) return v.map((x) => jsonValue(x));
  const out: Record<string, unknown> = {};
  for (const [k, x] of Object.entries(v as Record<string, unknown>)) {
    if (x === undefined) continue;
    out[keepKeys ? k : snakeKey(k)] = jsonValue(x, DATA_MAPS.has(k));
  }
  return out;
}

/** The JSON text a command prints: converted as above, two-space indent. */
export function jsonText(v: unknown): string {
  return JSON.stringify(jsonValue(v), null, 2);
}

/** Aligns rows into columns separated by two spaces; trailing spaces trimmed. `right` lists right-aligned columns. */
export function table(rows: readonly (readonly string[])[], right: readonly number[] = []): string[] {
  const widths: number[] = [];
  for (const r of rows) r.forEach((c, i) => (widths[i] = Math.max(widths[i] ?? 0, c.length)));
  return rows.map((r) => r.map((c, i) => (right.includes(i) ? c.padStart(widths[i]!) : c.padEnd(widths[i]!))).join('  ').trimEnd());
}

/** "2025-03-05 09:02" from an ISO time (UTC, as stored). */
export function shortTime(iso: string): string {
  const m = /^(\d{4}-\d{2}-\d{2})T(\d{2}:\d{2})/.exec(iso);
  return m ? `${m[1]} ${m[2]}` : iso;
}
