import { formatMetricValue, metricName } from '../engine/requirement-syntax.js';
import type { FreqUnit } from '../model/units.js';
import { cleanText } from './sanitize.js';
import { outcomeLabel } from './status.js';
import { layoutColumns, tableLine, type Column } from './table.js';
import type { CheckVM } from './view-model.js';

/** "pm >= 45deg": a requirement in the store's syntax, spaced for reading. */
export function requirementText(c: Pick<CheckVM, 'metric' | 'op' | 'limit'>, unit: FreqUnit): string {
  return `${c.metric} ${c.op} ${formatMetricValue(c.metric, c.limit, unit)}`;
}

/**
 * The requirement checklist: one line per requirement and variant, failing ones
 * first so they are on screen even when the list is cut. Variant and metric name
 * columns appear only when there is room (and, for variants, more than one).
 */
export function checklistLines(checks: readonly CheckVM[], unit: FreqUnit, width: number): string[] {
  if (checks.length === 0) return ['no requirements yet: add some with `loopledger spec AXIS/LOOP pm>=45 ...`'];
  const variants = new Set(checks.map((c) => c.variant));
  const cols: Column<CheckVM>[] = [
    { title: 'check', width: 6, align: 'left', cell: (c) => outcomeLabel(c.pass) },
    { title: 'requirement', width: 15, align: 'left', cell: (c) => requirementText(c, unit) },
    { title: 'value', width: 10, align: 'right', cell: (c) => formatMetricValue(c.metric, c.value, unit) },
  ];
  if (variants.size > 1) cols.push({ title: 'variant', width: 8, align: 'left', dropPriority: 2, cell: (c) => cleanText(c.variant) });
  const flex: Column<CheckVM> = {
    title: 'about',
    width: 0,
    align: 'left',
    cell: (c) => (c.reason ? cleanText(c.reason) : metricName(c.metric)),
  };
  const laid = layoutColumns(cols, flex, width, 0);
  const ordered = [...checks].sort((a, b) => Number(a.pass) - Number(b.pass));
  return [tableLine(laid, null), ...ordered.map((c) => tableLine(laid, c))];
}
