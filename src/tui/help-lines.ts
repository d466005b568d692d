import { KEY_TABLE, activeBindings, type KeyBinding, type KeyScope, type Screen } from './keys.js';
import { truncate } from './text.js';

const SCREEN_TITLE: Record<Screen, string> = {
  overview: 'Overview',
  loop: 'Loop view',
  history: 'History',
  compare: 'Compare two revisions',
  edit: 'Edit',
  tune: 'Tune',
};

const everything = (screen: Screen, typing: KeyScope['typing'] = null): KeyScope => ({
  screen, help: false, typing, hasSelection: true, hasProposal: true, canTune: true,
});

/** Bindings in the table's order that footer and help show (one per handler and key label). */
function unique(bs: readonly KeyBinding[]): KeyBinding[] {
  const seen = new Set<string>();
  return bs.filter((b) => {
    const k = `${b.handler}:${b.keyLabel}`;
    if (seen.has(k)) return false;
    seen.add(k);
    return true;
  });
}

/**
 * The footer: the keys that work now, as "key label" pairs, cut with `…` at the
 * window width so it never wraps.
 */
export function footerLine(scope: KeyScope, width: number, table: readonly KeyBinding[] = KEY_TABLE): string {
  const shown = unique(activeBindings(scope, table).filter((b) => b.showInFooter));
  // Help and quit are what a lost user looks for: they keep their place at the end even when the rest is cut.
  const last = shown.filter((b) => b.handler === 'help' || b.handler === 'quit');
  const item = (b: KeyBinding) => `${b.keyLabel} ${b.label}`;
  const tail = last.map(item).join('  ');
  const rest = shown.filter((b) => !last.includes(b)).map(item);
  // Whole items only, in table order, while they fit before the tail; a cut item is no use to anyone.
  const room = width - (tail === '' ? 0 : tail.length + 2);
  const head: string[] = [];
  for (const it of rest) {
    const next = [...head, it].join('  ');
    if (next.length + (head.length + 1 < rest.length ? 3 : 0) > room) break;
    head.push(it);
  }
  const more = head.length < rest.length ? (head.length === 0 ? '…' : '  …') : '';
  const line = head.join('  ') + more;
  if (line === '') return truncate(tail, width);
  if (tail === '') return truncate(line, width);
  return truncate(line + '  ' + tail, width);
}

const KEY_SPELLING: Record<string, string> = {
  up: 'Up', down: 'Down', enter: 'Enter', esc: 'Esc', tab: 'Tab', pgup: 'PgUp', pgdn: 'PgDn', home: 'Home', end: 'End', space: 'Space',
};

/** Every key of a binding, as the help screen spells them ("j/Down"). */
export function helpKeys(b: KeyBinding): string {
  return b.keys.map((k) => KEY_SPELLING[k] ?? k).join('/');
}

/**
 * The help screen, generated from the key table: keys that work on every screen,
 * then each screen's own keys, then the keys while typing.
 */
export function helpLines(width: number, table: readonly KeyBinding[] = KEY_TABLE): string[] {
  const screens = Object.keys(SCREEN_TITLE) as Screen[];
  const perScreen = screens.map((s) => unique(activeBindings(everything(s), table)));
  const common = perScreen[0]!.filter((b) => perScreen.every((list) => list.includes(b)));
  const keyWidth = Math.max(...table.map((b) => helpKeys(b).length)) + 2;
  const row = (b: KeyBinding) => truncate(`  ${helpKeys(b).padEnd(keyWidth)}${b.help}`, width);
  const out = ['Every screen', ...common.map(row)];
  screens.forEach((s, i) => {
    const own = perScreen[i]!.filter((b) => !common.includes(b));
    if (own.length) out.push('', SCREEN_TITLE[s], ...own.map(row));
  });
  const onHelp = unique(activeBindings({ ...everything('overview'), help: true }, table)).filter((b) => !common.includes(b));
  if (onHelp.length) out.push('', 'This help screen', ...onHelp.map(row));
  // Enter and Esc mean something different for each kind of text: list each meaning.
  const typing = (['filter', 'field', 'note'] as const).flatMap((t) => activeBindings(everything('edit', t), table));
  out.push('', 'While typing (filter, a block or requirement, a note)', ...typing.map(row));
  out.push(truncate(`  ${'Backspace'.padEnd(keyWidth)}delete the last character`, width));
  out.push(truncate(`  ${'ctrl-u'.padEnd(keyWidth)}clear the text`, width));
  out.push('', 'Status: + pass  x fail  ! unstable  ? error (cannot be analysed)');
  out.push('Worst miss: the first requirement missed, "+N" when N more also miss.');
  out.push('Sketches: ":" marks a gain crossover, "." the 0 dB, -180 deg and final-value rows.');
  return out;
}
