import type { FreqUnit } from '../model/units.js';
import { bodeSketch } from './bode-sketch.js';
import { checklistLines } from './checklist-lines.js';
import type { EditState } from './dash-state.js';
import { headlineText } from './headline-text.js';
import { windowTop } from './layout.js';
import type { ScreenLines } from './loop-screen.js';
import { cleanText } from './sanitize.js';
import { statusLabel } from './status.js';
import { marker, styled, type StyledLine } from './styled.js';
import { fit, truncate } from './text.js';
import type { WhatIfVM } from './view-model.js';

const BLOCK_HINT = 'e.g. gain:2 int pi:5Hz lead:30Hz/150Hz lag:2Hz/0.2Hz notch:420Hz,depth=20dB,q=2 lp1:300Hz';
const REQUIREMENT_HINT = 'e.g. pm>=45 gm>=6dB fc>=80Hz bw>=20Hz ms<=1.7 os<=10% ts<=50ms kv>=1000';

/** The live recompute of the draft as the edit screen knows it. */
export interface LiveResult {
  /** The newest answer, for the draft as it is now (null while it is computed). */
  readonly current: WhatIfVM | null;
  /** The last answer that could be computed, shown while the text does not read. */
  readonly lastGood: (WhatIfVM & { ok: true }) | null;
}

/** One of the two draft lists, windowed around its cursor when it is long. */
function listLines(title: string, rows: readonly string[], focused: boolean, e: EditState, typing: boolean, room: number, width: number): StyledLine[] {
  const out: StyledLine[] = [{ text: truncate(`${focused ? '[' + title + ']' : ' ' + title + ' '}  ${rows.length === 0 ? '(none)' : ''}`, width), tone: focused ? 'title' : 'dim' }];
  const top = focused ? windowTop(rows.length, e.cursor, room) : 0;
  rows.slice(top, top + room).forEach((r, k) => {
    const i = top + k;
    const sel = focused && i === e.cursor;
    const caret = sel && typing ? '_' : '';
    out.push({ text: truncate(`${marker(sel)}${String(i + 1).padStart(2)}  ${cleanText(r)}${caret}`, width), tone: sel ? 'selected' : 'plain' });
  });
  if (rows.length > top + room) out.push({ text: `    ... ${rows.length - top - room} more`, tone: 'dim' });
  return out;
}

/** The live part: status, each variant's numbers, the checklist, and a Bode sketch when there is room. */
function liveLines(live: LiveResult, unit: FreqUnit, width: number, room: number, colour: boolean): StyledLine[] {
  const cur = live.current;
  const shown = cur?.ok ? cur : live.lastGood;
  const out: StyledLine[] = [];
  if (cur === null) out.push({ text: 'live: computing...', tone: 'dim' });
  else if (!cur.ok) out.push({ text: truncate(`live: ${cleanText(cur.error)}${live.lastGood ? '  (below: last draft that could be read)' : ''}`, width), tone: 'error' });
  if (!shown) return out;
  if (cur?.ok) out.push({ text: `live: ${statusLabel(shown.status)}  (unsaved draft)`, tone: shown.status });
  for (const v of shown.variants) {
    const body = v.error ? `? error: ${cleanText(v.error)}` : `${v.stable ? 'stable  ' : '! UNSTABLE'}  ${headlineText(v.headline, unit)}`;
    out.push({ text: truncate(`${fit(cleanText(v.name), 10)} ${body}`, width), tone: v.error ? 'error' : v.stable ? 'plain' : 'unstable' });
  }
  const checks = checklistLines(shown.checks, unit, width).slice(1);
  out.push(...checks.map((text) => ({ text, tone: text.startsWith('x') ? ('fail' as const) : ('plain' as const) })));
  const left = room - out.length;
  if (left >= 12 && shown.bode[0]) out.push({ text: '' }, ...styled(bodeSketch(shown.bode[0], { width, height: Math.min(left - 1, 18), unit, colour })));
  return out;
}

/**
 * The edit screen: the draft's blocks and requirements (Tab moves between
 * them), and under them the loop as it would be, recomputed as you type.
 * Nothing is written until `s` and a note.
 */
export function editScreen(
  loopId: string, e: EditState | null, typing: 'field' | 'note' | null, note: string, live: LiveResult,
  unit: FreqUnit, width: number, height: number, colour: boolean,
): ScreenLines {
  if (e === null) return { lines: [{ text: `loading ${cleanText(loopId)}...`, tone: 'dim' }], contentRows: 0, pageRows: height, panes: 2 };
  const head: StyledLine[] = [
    { text: truncate(`Edit ${cleanText(loopId)}: draft on r${e.baseRevision}${e.dirty ? ', changed, not saved' : ''}`, width), tone: 'title' },
    {
      text: truncate(`${typing === 'field' ? 'Enter keeps, Esc undoes. ' : ''}${e.pane === 'blocks' ? BLOCK_HINT : REQUIREMENT_HINT}`, width),
      tone: 'dim',
    },
  ];
  const listRoom = Math.max(2, Math.floor((height - head.length - 6) / 2) - 1);
  const lists = [
    ...listLines('blocks', e.blocks, e.pane === 'blocks', e, typing === 'field', listRoom, width),
    ...listLines('requirements', e.requirements, e.pane === 'requirements', e, typing === 'field', listRoom, width),
  ];
  const prompt: StyledLine[] = typing === 'note' ? [{ text: truncate(`note for this revision: ${note}_`, width), tone: 'info' }] : [];
  const room = Math.max(1, height - head.length - lists.length - prompt.length - 1);
  const live1 = liveLines(live, unit, width, room, colour).slice(0, room);
  return { lines: [...head, ...lists, { text: '' }, ...live1, ...prompt], contentRows: 0, pageRows: height, panes: 2 };
}
