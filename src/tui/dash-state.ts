import type { FreqUnit } from '../model/units.js';
import type { Screen, Typing } from './keys.js';
import type { ProposalVM } from './view-model.js';

/**
 * The dashboard's whole state, one plain object. Selections are kept by id (loop
 * id, revision number), never by row index, so a reload that adds, removes or
 * reorders loops leaves the cursor on the same loop.
 */

/** Unsaved edit of one loop: texts as typed, in the block and requirement syntax. */
export interface EditState {
  readonly loopId: string;
  readonly baseRevision: number;
  readonly blocks: readonly string[];
  readonly requirements: readonly string[];
  readonly pane: 'blocks' | 'requirements';
  readonly cursor: number;
  /** The text before the field being typed, to restore on Esc; null when not typing a field. */
  readonly fieldBefore: string | null;
  readonly dirty: boolean;
}

export interface Message {
  readonly text: string;
  readonly kind: 'info' | 'error';
}

export interface DashState {
  /** Screens opened, the current one last; the overview is always first. */
  readonly stack: readonly Screen[];
  readonly help: boolean;
  readonly helpScroll: number;
  readonly typing: Typing;
  readonly selectedId: string | null;
  readonly filter: string;
  readonly failingOnly: boolean;
  /** Display unit chosen with `u`; null = the store's own. */
  readonly unit: FreqUnit | null;
  /** The loop the loop / history / edit / tune screens are about. */
  readonly loopId: string | null;
  readonly pane: number;
  readonly variant: number;
  /** Scroll offset of the current screen's long content. */
  readonly scroll: number;
  readonly historyRevision: number | null;
  readonly marked: number | null;
  readonly compare: { readonly a: number; readonly b: number } | null;
  readonly edit: EditState | null;
  readonly note: string;
  readonly tuneMethod: string | null;
  readonly proposal: ProposalVM | null;
  readonly message: Message | null;
}

/** The state on start-up: the overview, nothing selected yet (the first row will be). */
export function initialState(): DashState {
  return {
    stack: ['overview'],
    help: false,
    helpScroll: 0,
    typing: null,
    selectedId: null,
    filter: '',
    failingOnly: false,
    unit: null,
    loopId: null,
    pane: 0,
    variant: 0,
    scroll: 0,
    historyRevision: null,
    marked: null,
    compare: null,
    edit: null,
    note: '',
    tuneMethod: null,
    proposal: null,
    message: null,
  };
}

/** The screen on top. */
export function currentScreen(s: DashState): Screen {
  return s.stack[s.stack.length - 1]!;
}
