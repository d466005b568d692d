import type { FreqUnit } from '../model/units.js';
import type { DashState } from './dash-state.js';
import { windowTop } from './layout.js';
import { filterRows, overviewHeader, overviewTable, placeRows } from './overview-lines.js';
import { cleanText } from './sanitize.js';
import { marker, type StyledLine } from './styled.js';
import { truncate } from './text.js';
import type { OverviewVM } from './view-model.js';

/** The overview as the screen shows it, and the loop ids it lists (in order). */
export interface OverviewScreen {
  readonly lines: StyledLine[];
  readonly ids: string[];
  /** The selected id after falling back to the first row when the old one is gone. */
  readonly selectedId: string | null;
}

/**
 * Header, filter line, column titles, and the visible window of loop rows with
 * the selection marked. Only the rows that fit are built into lines.
 */
export function overviewScreen(vm: OverviewVM, s: DashState, unit: FreqUnit, width: number, height: number, nowMs: number): OverviewScreen {
  const placed = filterRows(placeRows(vm.rows), s.filter, s.failingOnly);
  const ids = placed.map((p) => p.row.id);
  const selectedId = s.selectedId !== null && ids.includes(s.selectedId) ? s.selectedId : (ids[0] ?? null);
  const { titles, body } = overviewTable(placed, unit, width);
  const filters: string[] = [];
  if (s.failingOnly) filters.push('failing only (f)');
  if (s.filter !== '' || s.typing === 'filter') filters.push(`name contains "${cleanText(s.filter)}${s.typing === 'filter' ? '_' : ''}"`);
  const filterLine = filters.length ? `showing ${ids.length} of ${vm.rows.length}: ${filters.join(', ')}` : '';
  const head: StyledLine[] = [
    ...overviewHeader({ ...vm, unit }, width, nowMs).map((text, i) => ({ text, tone: i === 0 ? ('title' as const) : ('dim' as const) })),
    { text: truncate(filterLine, width), tone: 'info' },
    { text: truncate('  ' + titles, width), tone: 'dim' },
  ];
  const visible = Math.max(1, height - head.length);
  const selIndex = body.findIndex((l) => l.id === selectedId);
  const top = windowTop(body.length, selIndex, visible);
  const rows: StyledLine[] = body.slice(top, top + visible).map((l) => {
    const sel = l.id !== null && l.id === selectedId;
    const text = truncate(marker(sel) + l.text, width);
    return { text, tone: sel ? 'selected' : l.status ?? 'title' };
  });
  if (vm.rows.length === 0) rows.push({ text: truncate('  no loops yet: add one with `loopledger loop add AXIS/LOOP --plant EXPR`', width) });
  else if (ids.length === 0) rows.push({ text: '  no loop matches: Esc clears the filters', tone: 'info' });
  if (top + visible < body.length) rows[rows.length - 1] = { text: truncate(`  ... ${body.length - top - visible + 1} more below (j, PgDn)`, width), tone: 'dim' };
  return { lines: [...head, ...rows], ids, selectedId };
}
