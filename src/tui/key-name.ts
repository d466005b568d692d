import type { Key } from 'ink';

/**
 * One name per key press, as the key table spells it: "up", "enter", "esc",
 * "tab", "pgdn", "space", "ctrl-d", or the character itself. Typed text can
 * arrive as one chunk ("ab\r" from a paste or a fast typist): `keyNames` splits it.
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
  return Array.from(input).flatMap((ch) => {
    const named = CHUNK_CONTROLS[ch];
    if (named !== undefined) return [named];
    return /[\x00-\x1f\x7f-\x9f]/.test(ch) ? [] : [ch];
  });
}

// Inside a chunk ("j\r" from a fast typist or a script), ink leaves control characters as they are.
const CHUNK_CONTROLS: Record<string, string> = {
  ' ': 'space', '\r': 'enter', '\n': 'enter', '\t': 'tab', '\x7f': 'backspace', '\b': 'backspace', '\x1b': 'esc',
};
