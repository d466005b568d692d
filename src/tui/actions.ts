import { formatRequirement } from '../engine/requirement-syntax.js';
import type { FreqUnit } from '../model/units.js';
import { blockText } from './block-lines.js';
import { currentScreen, type DashState, type EditState } from './dash-state.js';
import type { Action } from './keys.js';
import type { DraftVM, LoopDetailVM, ProposalVM, SaveResultVM } from './view-model.js';

/**
 * The controller: what each action of the key table does to the state. It is a
 * plain function of (state, action, what is on screen); work that needs the
 * store comes back as an effect, which the app runs and answers with one of the
 * `...Done` functions below. Tests drive it without a terminal or a store.
 */

/** Work for the app to do against the source after an action. */
export type Effect =
  | { readonly kind: 'quit' }
  | { readonly kind: 'startEdit'; readonly loopId: string }
  | { readonly kind: 'save'; readonly loopId: string; readonly draft: DraftVM; readonly baseRevision: number; readonly note: string }
  | { readonly kind: 'apply'; readonly loopId: string; readonly proposal: ProposalVM & { ok: true }; readonly note: string }
  | { readonly kind: 'propose'; readonly loopId: string; readonly method: string };

/** A new state, and maybe work to do. */
export interface Step {
  readonly state: DashState;
  readonly effect?: Effect;
}

/** What is on screen now, as the actions need it. */
export interface ActContext {
  readonly storeUnit: FreqUnit;
  /** Overview loop ids as shown (filtered, in order). */
  readonly overviewIds: readonly string[];
  /** The loop's revisions as shown, newest first. */
  readonly historyRevisions: readonly number[];
  readonly tuneMethods: readonly string[];
  /** Lines of the current scrollable content and how many fit. */
  readonly contentRows: number;
  readonly pageRows: number;
  readonly panes: number;
  readonly variants: number;
}

const clamp = (x: number, lo: number, hi: number) => Math.max(lo, Math.min(hi, x));

/** Moves a selection held by value within `items` by `delta` (or to an end). */
function moveIn<T>(items: readonly T[], current: T | null, delta: number): T | null {
  if (items.length === 0) return null;
  const i = current === null ? -1 : items.indexOf(current);
  const from = i < 0 ? 0 : i;
  return items[clamp(from + delta, 0, items.length - 1)]!;
}

/** Applies a move (j/k/pages/ends) to whatever the current screen moves. */
function move(s: DashState, delta: number, c: ActContext, byPage = false): DashState {
  const scrolled = (at: number) => clamp(at + delta, 0, Math.max(0, c.contentRows - c.pageRows));
  if (s.help) return { ...s, helpScroll: scrolled(s.helpScroll) };
  const screen = currentScreen(s);
  // On the tune screen j/k pick a method and the pages scroll the worksheet.
  if (screen === 'tune' && byPage) return { ...s, scroll: scrolled(s.scroll) };
  switch (screen) {
    case 'overview': return { ...s, selectedId: moveIn(c.overviewIds, s.selectedId, delta) };
    case 'history': return { ...s, historyRevision: moveIn(c.historyRevisions, s.historyRevision, delta) };
    case 'tune': return { ...s, tuneMethod: moveIn(c.tuneMethods, s.tuneMethod, delta), proposal: null, scroll: 0 };
    case 'edit': {
      const e = s.edit!;
      const n = (e.pane === 'blocks' ? e.blocks : e.requirements).length;
      return { ...s, edit: { ...e, cursor: clamp(e.cursor + delta, 0, Math.max(0, n - 1)) } };
    }
    default: return { ...s, scroll: scrolled(s.scroll) };
  }
}

const push = (s: DashState, screen: DashState['stack'][number]): DashState => ({ ...s, stack: [...s.stack, screen], scroll: 0 });

/** The loop the current screen is about: the open loop, or the overview's selection. */
function focusLoop(s: DashState, c: ActContext): string | null {
  if (currentScreen(s) === 'overview') return s.selectedId !== null && c.overviewIds.includes(s.selectedId) ? s.selectedId : (c.overviewIds[0] ?? null);
  return s.loopId;
}

/** The loaded loop becomes the draft: texts in the store's unit, which is how the engine reads bare numbers. */
export function editLoaded(s: DashState, d: LoopDetailVM): DashState {
  if (currentScreen(s) !== 'edit' || s.loopId !== d.id || s.edit !== null) return s;
  const edit: EditState = {
    loopId: d.id,
    baseRevision: d.revision,
    blocks: d.blocks.map((b) => blockText(b, d.unit)),
    requirements: d.requirements.map((r) => formatRequirement(r, d.unit)),
    pane: 'blocks',
    cursor: 0,
    fieldBefore: null,
    dirty: false,
  };
  return { ...s, edit };
}

/** A save came back: leave the screen on success; on a conflict keep the draft and say so. */
export function saveDone(s: DashState, loopId: string, r: SaveResultVM): DashState {
  if (!r.ok) {
    const text = r.conflict ? `conflict, not saved: ${r.message}` : `not saved: ${r.message}`;
    return { ...s, message: { text, kind: 'error' } };
  }
  const screen = currentScreen(s);
  const leave = screen === 'edit' || screen === 'tune';
  return {
    ...s,
    note: '',
    edit: leave ? null : s.edit,
    proposal: leave ? null : s.proposal,
    stack: leave ? s.stack.slice(0, -1) : s.stack,
    scroll: 0,
    message: { text: `saved ${loopId} r${r.revision}`, kind: 'info' },
  };
}

/** The design assistant answered. */
export function proposed(s: DashState, method: string, p: ProposalVM): DashState {
  return s.tuneMethod === method ? { ...s, proposal: p, scroll: 0, message: null } : s;
}

/** The edit's current list and a copy with row `i` replaced (or removed with null, or inserted with `insert`). */
function editRows(e: EditState, i: number, text: string | null, insert = false): EditState {
  const list = [...(e.pane === 'blocks' ? e.blocks : e.requirements)];
  if (insert) list.splice(i, 0, text ?? '');
  else if (text === null) list.splice(i, 1);
  else list[i] = text;
  const cursor = clamp(i, 0, Math.max(0, list.length - 1));
  return e.pane === 'blocks' ? { ...e, blocks: list, cursor, dirty: true } : { ...e, requirements: list, cursor, dirty: true };
}

/** The text of the selected edit row. */
export function editField(e: EditState): string {
  return (e.pane === 'blocks' ? e.blocks : e.requirements)[e.cursor] ?? '';
}

/** Adds typed characters to whatever is being typed. */
export function typeText(s: DashState, chars: readonly string[]): DashState {
  const text = chars.map((ch) => (ch === 'space' ? ' ' : ch)).filter((ch) => ch.length === 1).join('');
  if (text === '') return s;
  if (s.typing === 'filter') return { ...s, filter: s.filter + text };
  if (s.typing === 'note') return { ...s, note: s.note + text };
  if (s.typing === 'field' && s.edit) return { ...s, edit: { ...editRows(s.edit, s.edit.cursor, editField(s.edit) + text), fieldBefore: s.edit.fieldBefore } };
  return s;
}

/** Deletes the last typed character. */
export function backspace(s: DashState): DashState {
  return editTyped(s, (t) => Array.from(t).slice(0, -1).join(''));
}

/** Clears what is being typed (Ctrl-U, as in a shell). */
export function clearTyped(s: DashState): DashState {
  return editTyped(s, () => '');
}

/** Applies `cut` to the text being typed. */
function editTyped(s: DashState, cut: (t: string) => string): DashState {
  if (s.typing === 'filter') return { ...s, filter: cut(s.filter) };
  if (s.typing === 'note') return { ...s, note: cut(s.note) };
  if (s.typing === 'field' && s.edit) return { ...s, edit: { ...editRows(s.edit, s.edit.cursor, cut(editField(s.edit))), fieldBefore: s.edit.fieldBefore } };
  return s;
}

/** Ends typing with Enter: keeps the text, or saves with the note. */
function accept(s: DashState, c: ActContext): Step {
  if (s.typing === 'filter') return { state: { ...s, typing: null } };
  if (s.typing === 'field' && s.edit) {
    const e = s.edit;
    const done = editField(e).trim() === '' ? editRows(e, e.cursor, null) : e;
    return { state: { ...s, typing: null, edit: { ...done, fieldBefore: null } } };
  }
  if (s.typing === 'note') return saveWithNote(s, c);
  return { state: s };
}

/** Ends typing with Esc: the filter is cleared, a field gets its old text back, a save is called off. */
function cancel(s: DashState): DashState {
  if (s.typing === 'filter') return { ...s, typing: null, filter: '' };
  if (s.typing === 'field' && s.edit) {
    const e = s.edit;
    const back = e.fieldBefore === '' ? editRows(e, e.cursor, null) : editRows(e, e.cursor, e.fieldBefore ?? editField(e));
    return { ...s, typing: null, edit: { ...back, fieldBefore: null, dirty: e.dirty && e.fieldBefore !== null } };
  }
  if (s.typing === 'note') return { ...s, typing: null, note: '', message: { text: 'not saved', kind: 'info' } };
  return s;
}

/** Asks the app to save the draft or the proposal with the typed note (a note is required). */
function saveWithNote(s: DashState, c: ActContext): Step {
  const note = s.note.trim();
  if (note === '') return { state: { ...s, message: { text: 'a note is needed: say what changed and why', kind: 'error' } } };
  const loopId = s.loopId!;
  const saving = { ...s, typing: null, message: { text: 'saving...', kind: 'info' as const } };
  if (currentScreen(s) === 'tune' && s.proposal?.ok) return { state: saving, effect: { kind: 'apply', loopId, proposal: s.proposal, note } };
  if (s.edit) {
    const draft: DraftVM = { unit: c.storeUnit, blocks: s.edit.blocks, requirements: s.edit.requirements };
    return { state: saving, effect: { kind: 'save', loopId, draft, baseRevision: s.edit.baseRevision, note } };
  }
  return { state: { ...s, typing: null } };
}

/** Leaves the current screen (an unsaved draft needs a second Esc). */
function back(s: DashState): DashState {
  const screen = currentScreen(s);
  if (screen === 'overview') return { ...s, filter: '', failingOnly: false };
  if (screen === 'edit' && s.edit?.dirty && s.message?.text !== DISCARD_WARNING) {
    return { ...s, message: { text: DISCARD_WARNING, kind: 'error' } };
  }
  return { ...s, stack: s.stack.slice(0, -1), edit: screen === 'edit' ? null : s.edit, proposal: null, scroll: 0, message: null };
}

const DISCARD_WARNING = 'unsaved changes: Esc again to discard them, s to save';

/** Applies one action of the key table. */
export function act(s0: DashState, action: Action, c: ActContext): Step {
  const r = actOn(s0, action, c);
  return 'state' in r ? r : { state: r };
}

function actOn(s0: DashState, action: Action, c: ActContext): DashState | Step {
  // A message lives until the next key, except the discard warning, which the next key reads.
  const s = action === 'back' ? s0 : { ...s0, message: null };
  const page = Math.max(1, c.pageRows - 1);
  switch (action) {
    case 'quit': return { state: s, effect: { kind: 'quit' } };
    case 'help': return { ...s, help: true, helpScroll: 0 };
    case 'closeHelp': return { ...s, help: false };
    case 'back': return back(s);
    case 'down': return move(s, 1, c);
    case 'up': return move(s, -1, c);
    case 'pageDown': return move(s, page, c, true);
    case 'pageUp': return move(s, -page, c, true);
    case 'home': return move(s, -1e9, c);
    case 'end': return move(s, 1e9, c);
    case 'open': {
      const id = focusLoop(s, c);
      return id === null ? s : { ...push(s, 'loop'), loopId: id, selectedId: id, pane: 0, variant: 0 };
    }
    case 'filter': return { ...s, typing: 'filter' };
    case 'failing': return { ...s, failingOnly: !s.failingOnly };
    case 'unit': return { ...s, unit: (s.unit ?? c.storeUnit) === 'hz' ? 'rad' : 'hz' };
    case 'pane':
      if (currentScreen(s) === 'edit' && s.edit) return { ...s, edit: { ...s.edit, pane: s.edit.pane === 'blocks' ? 'requirements' : 'blocks', cursor: 0 } };
      return { ...s, pane: (s.pane + 1) % Math.max(1, c.panes), scroll: 0 };
    case 'variant': return { ...s, variant: (s.variant + 1) % Math.max(1, c.variants) };
    case 'history': {
      const id = focusLoop(s, c);
      return id === null ? s : { ...push(s, 'history'), loopId: id, selectedId: id, historyRevision: null, marked: null };
    }
    case 'edit': {
      const id = focusLoop(s, c);
      if (id === null) return s;
      return { state: { ...push(s, 'edit'), loopId: id, selectedId: id, edit: null }, effect: { kind: 'startEdit', loopId: id } };
    }
    case 'tune': {
      const id = focusLoop(s, c);
      return id === null ? s : { ...push(s, 'tune'), loopId: id, selectedId: id, tuneMethod: c.tuneMethods[0] ?? null, proposal: null };
    }
    case 'mark': {
      const rev = s.historyRevision ?? c.historyRevisions[0] ?? null;
      return { ...s, marked: s.marked === rev ? null : rev };
    }
    case 'compare': return compare(s, c);
    case 'fieldEdit': return s.edit ? { ...s, typing: 'field', edit: { ...s.edit, fieldBefore: editField(s.edit) } } : s;
    case 'addBlock':
    case 'addRequirement': {
      if (!s.edit) return s;
      const pane = action === 'addBlock' ? 'blocks' : 'requirements';
      const list = pane === 'blocks' ? s.edit.blocks : s.edit.requirements;
      const at = pane === s.edit.pane && list.length > 0 ? s.edit.cursor + 1 : list.length;
      return { ...s, typing: 'field', edit: { ...editRows({ ...s.edit, pane }, at, '', true), fieldBefore: '' } };
    }
    case 'remove': return s.edit ? { ...s, edit: editRows(s.edit, s.edit.cursor, null) } : s;
    case 'save':
    case 'apply': return { ...s, typing: 'note', note: '' };
    case 'run': {
      if (s.loopId === null || s.tuneMethod === null) return s;
      return { state: { ...s, proposal: null, message: { text: 'designing...', kind: 'info' } }, effect: { kind: 'propose', loopId: s.loopId, method: s.tuneMethod } };
    }
    case 'accept': return accept(s, c);
    case 'cancel': return cancel(s);
  }
}

/** Compares the cursor's revision with the marked one, or with the one before it. */
function compare(s: DashState, c: ActContext): DashState {
  const b = s.historyRevision ?? c.historyRevisions[0];
  if (b === undefined) return s;
  const older = c.historyRevisions[c.historyRevisions.indexOf(b) + 1];
  const a = s.marked !== null && s.marked !== b ? s.marked : older;
  if (a === undefined) return { ...s, message: { text: 'this is the first revision: mark another one with Space', kind: 'info' } };
  return { ...push(s, 'compare'), compare: { a: Math.min(a, b), b: Math.max(a, b) }, variant: 0 };
}
