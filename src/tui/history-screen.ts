import type { DashState } from './dash-state.js';
import { windowTop } from './layout.js';
import type { ScreenLines } from './loop-screen.js';
import { cleanText } from './sanitize.js';
import { statusLabel } from './status.js';
import { marker, type StyledLine } from './styled.js';
import { fit, fitRight, truncate } from './text.js';
import type { LoopDetailVM } from './view-model.js';
import { formatWhen } from './when.js';

/** The revision under the cursor (the newest when none is chosen yet). */
export function historyCursor(d: LoopDetailVM, s: DashState): number | null {
  const revs = d.history.map((r) => r.revision);
  return s.historyRevision !== null && revs.includes(s.historyRevision) ? s.historyRevision : (revs[0] ?? null);
}

/**
 * A loop's revisions, newest first: number, what changed, status right after,
 * author, when, note. `*` marks the revision picked for comparison.
 */
export function historyScreen(d: LoopDetailVM, s: DashState, width: number, height: number, nowMs: number): ScreenLines {
  const cursor = historyCursor(d, s);
  const head: StyledLine[] = [
    { text: truncate(`${cleanText(d.id)}: ${d.history.length} revisions, newest first`, width), tone: 'title' },
    {
      text: truncate(s.marked === null ? 'Space marks a revision; Enter compares the cursor with it (or with the one before)' : `r${s.marked} marked: move to another and press Enter to compare`, width),
      tone: 'dim',
    },
    { text: truncate(`    ${'rev'.padStart(4)} ${fit('change', 7)} ${fit('status', 10)} ${fit('author', 10)} ${fit('when', 10)} note`, width), tone: 'dim' },
  ];
  const rows = d.history.map((r): StyledLine => {
    const mark = s.marked === r.revision ? '*' : ' ';
    const status = r.status === null ? '-' : statusLabel(r.status);
    const text = `${marker(r.revision === cursor)}${mark} ${fitRight(`r${r.revision}`, 4)} ${fit(cleanText(r.kind), 7)} ${fit(status, 10)} ${fit(cleanText(r.author), 10)} ${fit(formatWhen(r.at, nowMs), 10)} ${cleanText(r.note)}`;
    return { text: truncate(text, width), tone: r.revision === cursor ? 'selected' : (r.status ?? 'plain') };
  });
  const room = Math.max(1, height - head.length);
  const top = windowTop(rows.length, d.history.findIndex((r) => r.revision === cursor), room);
  return { lines: [...head, ...rows.slice(top, top + room)], contentRows: rows.length, pageRows: room, panes: 1 };
}
