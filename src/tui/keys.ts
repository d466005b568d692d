/**
 * The key table: every key the dashboard answers to, as data. The same table
 * draws the footer (keys that work now), the help screen, and dispatches input,
 * so the three can never disagree. Handlers are named actions; the controller
 * (src/tui/actions.ts) says what each one does.
 */

export type Screen = 'overview' | 'loop' | 'history' | 'compare' | 'edit' | 'tune';

/** Text being typed: the name filter, a block or requirement, a save note. */
export type Typing = 'filter' | 'field' | 'note' | null;

/** What decides whether a key works now. */
export interface KeyScope {
  readonly screen: Screen;
  readonly help: boolean;
  readonly typing: Typing;
  /** Whether the screen has something selected to act on (a loop, a row). */
  readonly hasSelection: boolean;
  /** Whether the tune screen holds a proposal that can be applied. */
  readonly hasProposal: boolean;
  /** Whether the design assistant offers any method. */
  readonly canTune: boolean;
}

export type Action =
  | 'quit' | 'help' | 'closeHelp' | 'back'
  | 'down' | 'up' | 'pageDown' | 'pageUp' | 'home' | 'end'
  | 'open' | 'filter' | 'failing' | 'unit' | 'pane' | 'variant'
  | 'history' | 'edit' | 'tune' | 'mark' | 'compare'
  | 'fieldEdit' | 'addBlock' | 'addRequirement' | 'remove' | 'save'
  | 'run' | 'apply'
  | 'accept' | 'cancel';

export interface KeyBinding {
  /** Key names as `keyName` returns them: a character, or up/down/enter/esc/tab/pgup/pgdn/home/end/space/delete. */
  readonly keys: readonly string[];
  /** How the footer and help show the keys ("j/k"). */
  readonly keyLabel: string;
  /** What it does in a word or two, for the footer ("move"). */
  readonly label: string;
  /** What it does, for the help screen. */
  readonly help: string;
  readonly handler: Action;
  readonly when: (s: KeyScope) => boolean;
  readonly showInFooter: boolean;
}

const browsing = (s: KeyScope) => !s.help && s.typing === null;
const on = (...screens: Screen[]) => (s: KeyScope) => browsing(s) && screens.includes(s.screen);
const typing = (t: Typing) => (s: KeyScope) => !s.help && s.typing === t;
const lists: Screen[] = ['overview', 'loop', 'history', 'compare', 'edit', 'tune'];

const bind = (
  keys: string[], keyLabel: string, label: string, help: string, handler: Action, when: (s: KeyScope) => boolean, showInFooter = true,
): KeyBinding => ({ keys, keyLabel, label, help, handler, when, showInFooter });

const moving = (s: KeyScope) => s.typing === null && (s.help || lists.includes(s.screen));
const selected = (...screens: Screen[]) => (s: KeyScope) => on(...screens)(s) && s.hasSelection;

/** The whole key table, in the order the help screen lists it. */
export const KEY_TABLE: readonly KeyBinding[] = [
  // Typing: only these keys are bindings; every other key is text.
  bind(['enter'], 'Enter', 'keep', 'keep the filter', 'accept', typing('filter')),
  bind(['esc'], 'Esc', 'clear', 'clear the filter', 'cancel', typing('filter')),
  bind(['enter'], 'Enter', 'keep', 'keep this text', 'accept', typing('field')),
  bind(['esc'], 'Esc', 'undo', 'undo this text', 'cancel', typing('field')),
  bind(['enter'], 'Enter', 'save', 'save with this note', 'accept', typing('note')),
  bind(['esc'], 'Esc', 'do not save', 'do not save', 'cancel', typing('note')),
  // Moving (also scrolls the help screen).
  bind(['j', 'down'], 'j/k', 'move', 'move down', 'down', moving),
  bind(['k', 'up'], 'k', 'up', 'move up', 'up', moving, false),
  bind(['pgdn', 'ctrl-d'], 'PgDn', 'page', 'page down', 'pageDown', moving, false),
  bind(['pgup', 'ctrl-u'], 'PgUp', 'page', 'page up', 'pageUp', moving, false),
  bind(['home', 'g'], 'Home/g', 'first', 'first row', 'home', moving, false),
  bind(['end', 'G'], 'End/G', 'last', 'last row', 'end', moving, false),
  // Help screen.
  bind(['esc', '?'], 'Esc/?', 'close help', 'close help', 'closeHelp', (s) => s.help),
  bind(['q'], 'q', 'quit', 'quit', 'quit', (s) => s.help),
  // Overview.
  bind(['enter'], 'Enter', 'open', 'open the selected loop', 'open', selected('overview')),
  bind(['/'], '/', 'filter', 'filter loops by name', 'filter', on('overview')),
  bind(['f'], 'f', 'failing', 'show failing loops only (toggle)', 'failing', on('overview')),
  // Loop view.
  bind(['tab'], 'Tab', 'pane', 'next pane', 'pane', on('loop', 'edit')),
  bind(['v'], 'v', 'variant', 'next plant variant', 'variant', on('loop', 'compare')),
  bind(['e'], 'e', 'edit', 'edit the compensator and requirements', 'edit', selected('overview', 'loop')),
  bind(['t'], 't', 'tune', 'tune with the design assistant', 'tune', (s) => selected('overview', 'loop')(s) && s.canTune),
  bind(['h'], 'h', 'history', 'revisions of the loop', 'history', selected('overview', 'loop')),
  bind(['u'], 'u', 'Hz/rad/s', 'show frequencies in Hz or rad/s', 'unit', on('overview', 'loop', 'history', 'compare', 'tune')),
  // History.
  bind(['space', 'm'], 'Space', 'mark', 'mark a revision to compare', 'mark', selected('history')),
  bind(['enter', 'c'], 'Enter', 'compare', 'compare with the marked (or the previous) revision', 'compare', selected('history')),
  // Edit.
  bind(['s'], 's', 'save', 'save as a new revision (asks for a note)', 'save', on('edit')),
  bind(['enter'], 'Enter', 'change', 'change the selected block or requirement', 'fieldEdit', selected('edit')),
  bind(['a'], 'a', 'add block', 'add a block', 'addBlock', on('edit')),
  bind(['r'], 'r', 'add req', 'add a requirement', 'addRequirement', on('edit')),
  bind(['d'], 'd', 'remove', 'remove the selected row', 'remove', selected('edit')),
  // Tune.
  bind(['enter'], 'Enter', 'run', 'run the selected method', 'run', selected('tune')),
  bind(['s'], 's', 'save', 'save the proposal as a new revision (asks for a note)', 'apply', (s) => on('tune')(s) && s.hasProposal),
  // Everywhere.
  bind(['esc'], 'Esc', 'back', 'back to the screen before', 'back', (s) => browsing(s) && s.screen !== 'overview'),
  bind(['esc'], 'Esc', 'clear', 'clear the filters', 'back', on('overview'), false),
  bind(['?'], '?', 'help', 'this help: every key', 'help', browsing),
  bind(['q'], 'q', 'quit', 'quit', 'quit', browsing),
];

/** The bindings that work in this scope. */
export function activeBindings(scope: KeyScope, table: readonly KeyBinding[] = KEY_TABLE): KeyBinding[] {
  return table.filter((b) => b.when(scope));
}

/** The action a key name triggers now, or null (while typing, null means "it is text"). */
export function actionFor(name: string, scope: KeyScope, table: readonly KeyBinding[] = KEY_TABLE): Action | null {
  return table.find((b) => b.keys.includes(name) && b.when(scope))?.handler ?? null;
}
