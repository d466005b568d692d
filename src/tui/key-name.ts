import type { Key } from 'ink';

/**
 * One name per key press, as the key table spells it: "up", "enter", "esc",
 * "tab", "pgdn", "space", "ctrl-d", or the character itself. Typed text can
 * arrive as one chunk ("ab" from a paste or a fast typist): `keyNames` splits it.
 */
export function keyNames(input: string, key: Key): string[] {
  if (key.upArrow) return ['up'];
  if (key.downArrow) return ['down'];
  if (key.leftArrow) return ['left'];
  if (key.rightArrow) return ['right'];
  if (key.pageDown) return ['pgdn'];
  if (key.pageUp) return ['pgup'];
  if (key.home) return ['home'];
  if (key.end) return ['end'];
  if (key.return) return ['enter'];
  if (key.escape) return ['esc'];
  if (key.tab) return [key.shift ? 'shift-tab' : 'tab'];
  // Terminals send DEL (0x7f) for the Backspace key; ink reports it as `delete`.
  if (key.backspace || key.delete) return ['backspace'];
  if (key.ctrl) return input ? [`ctrl-${input.toLowerCase()}`] : [];
  return Array.from(input).map((ch) => (ch === ' ' ? 'space' : ch));
}
