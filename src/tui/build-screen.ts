import type { FreqUnit } from '../model/units.js';
import type { ActContext } from './actions.js';
import { compareScreen } from './compare-screen.js';
import { currentScreen, type DashState } from './dash-state.js';
import { editScreen, type LiveResult } from './edit-screen.js';
import { footerLine, helpLines } from './help-lines.js';
import { historyCursor, historyScreen } from './history-screen.js';
import type { KeyScope } from './keys.js';
import type { FrameSize } from './layout.js';
import { loopScreen, type ScreenLines } from './loop-screen.js';
import { overviewScreen } from './overview-screen.js';
import { cleanText } from './sanitize.js';
import { styled, type StyledLine } from './styled.js';
import { truncate } from './text.js';
import { tuneScreen } from './tune-screen.js';
import type { CompareVM, LoopDetailVM, OverviewVM, TuneMethodVM } from './view-model.js';

/** What has been loaded from the source so far. */
export interface ScreenData {
  readonly overview: OverviewVM | null;
  readonly detail: LoopDetailVM | null;
  readonly compare: CompareVM | null;
  readonly methods: readonly TuneMethodVM[];
  readonly live: LiveResult;
  readonly loadError: string | null;
}

/** A whole frame: title, body, footer, and what the keys need to know about it. */
export interface BuiltFrame {
  readonly title: StyledLine;
  readonly body: StyledLine[];
  readonly footer: string;
  readonly scope: KeyScope;
  readonly ctx: ActContext;
}

const TITLES = { overview: 'overview', loop: 'loop', history: 'history', compare: 'compare', edit: 'edit', tune: 'tune' } as const;

/** Splits a message into at most `max` lines of `width` at spaces. */
export function wrapMessage(text: string, width: number, max = 3): string[] {
  const out: string[] = [];
  let line = '';
  for (const word of cleanText(text).split(' ')) {
    if (line !== '' && line.length + 1 + word.length > width) {
      out.push(line);
      line = word;
    } else line = line === '' ? word : `${line} ${word}`;
  }
  if (line !== '') out.push(line);
  return out.length > max ? [...out.slice(0, max - 1), truncate(out.slice(max - 1).join(' '), width)] : out;
}

/**
 * Builds the frame for the current state from the data loaded so far: the
 * screen's own lines, a message (wrapped, above the footer) and the footer of
 * keys that work now. Pure, so the layout of every screen is tested without a terminal.
 */
export function buildFrame(s: DashState, data: ScreenData, size: FrameSize, colour: boolean, nowMs: number): BuiltFrame {
  const screen = currentScreen(s);
  const storeUnit: FreqUnit = data.overview?.unit ?? data.detail?.unit ?? 'hz';
  const unit = s.unit ?? storeUnit;
  const message = s.message ? wrapMessage(s.message.text, size.width) : data.loadError ? wrapMessage(data.loadError, size.width) : [];
  const room = size.body - message.length;
  const detail = data.detail !== null && data.detail.id === s.loopId ? data.detail : null;
  const waiting = (what: string): ScreenLines => ({ lines: [{ text: `loading ${what}...`, tone: 'dim' }], contentRows: 0, pageRows: room, panes: 1 });

  let overviewIds: string[] = [];
  let selectedId = s.selectedId;
  let built: ScreenLines;
  if (s.help) {
    const lines = helpLines(size.width);
    const top = Math.max(0, Math.min(s.helpScroll, lines.length - room));
    const shown = styled(lines.slice(top, top + room));
    if (top + room < lines.length) shown[shown.length - 1] = { text: `... ${lines.length - top - room + 1} more lines (j, PgDn)`, tone: 'dim' };
    built = { lines: shown, contentRows: lines.length, pageRows: room, panes: 1 };
  } else if (screen === 'overview') {
    if (data.overview) {
      const o = overviewScreen(data.overview, s, unit, size.width, room, nowMs);
      overviewIds = o.ids;
      selectedId = o.selectedId;
      built = { lines: o.lines, contentRows: o.ids.length, pageRows: room - 4, panes: 1 };
    } else built = waiting('the machine');
  } else if (screen === 'loop') built = detail ? loopScreen(detail, s, unit, size.width, room, colour, nowMs) : waiting(s.loopId ?? 'loop');
  else if (screen === 'history') built = detail ? historyScreen(detail, s, size.width, room, nowMs) : waiting('history');
  else if (screen === 'compare') {
    const c = data.compare;
    const fits = c !== null && s.compare !== null && c.loopId === s.loopId && c.a.revision === s.compare.a && c.b.revision === s.compare.b;
    built = fits ? compareScreen(c, s, unit, size.width, room, colour) : waiting('both revisions');
  } else if (screen === 'edit') {
    built = editScreen(s.loopId ?? '', s.edit, s.typing === 'filter' ? null : s.typing, s.note, data.live, detail?.unit ?? storeUnit, size.width, room, colour);
  } else built = tuneScreen(s.loopId ?? '', data.methods, s, s.proposal, unit, size.width, room);

  const historyRevisions = detail?.history.map((r) => r.revision) ?? [];
  const hasSelection =
    screen === 'overview' ? selectedId !== null && overviewIds.length > 0
    : screen === 'history' ? detail !== null && historyCursor(detail, s) !== null
    : screen === 'edit' ? (s.edit !== null && (s.edit.pane === 'blocks' ? s.edit.blocks : s.edit.requirements).length > 0)
    : screen === 'tune' ? s.tuneMethod !== null
    : s.loopId !== null;
  const scope: KeyScope = {
    screen, help: s.help, typing: s.typing, hasSelection,
    hasProposal: s.proposal?.ok === true && s.proposal.meets, canTune: data.methods.length > 0,
  };
  const variants = screen === 'compare' ? new Set(data.compare?.deltas.map((d) => d.variant)).size : (detail?.variants.length ?? 1);
  const ctx: ActContext = {
    storeUnit,
    overviewIds,
    historyRevisions,
    tuneMethods: data.methods.map((m) => m.key),
    contentRows: built.contentRows,
    pageRows: built.pageRows,
    panes: built.panes,
    variants,
  };
  const where = [TITLES[screen], ...(screen === 'overview' ? [] : [cleanText(s.loopId ?? '')])].join(' ');
  const title: StyledLine = { text: truncate(`loopledger  ${s.help ? 'help' : where}  (${unit === 'hz' ? 'Hz' : 'rad/s'})`, size.width), tone: 'title' };
  const body = [...built.lines.slice(0, room), ...Array.from({ length: Math.max(0, room - built.lines.length) }, () => ({ text: '' }))];
  body.push(...message.map((text) => ({ text, tone: s.message?.kind === 'info' ? ('info' as const) : ('error' as const) })));
  return { title, body, footer: footerLine(scope, size.width), scope, ctx };
}
