/**
 * Store strings (names, notes, expressions, authors) are typed by people and may
 * come from a colleague's terminal or a loaded file. Shown raw, an escape
 * sequence in a note could move the cursor, retitle the window or clear the
 * screen. Everything from the store passes through `cleanText` before display.
 */

// ECMA-48 forms, longest first so an introducer is never left half-removed:
// - string controls ESC P / ESC X / ESC ] / ESC ^ / ESC _ ... terminated by BEL or ST (ESC \ or 0x9c);
// - CSI (ESC [ or 0x9b): parameter bytes 0x30-0x3f, intermediate 0x20-0x2f, final 0x40-0x7e;
// - other escapes: ESC, intermediates 0x20-0x2f, one final 0x30-0x7e.
const STRING_CONTROL = /(?:\x1b[PX\]^_]|[\x90\x98\x9d\x9e\x9f])[\s\S]*?(?:\x07|\x1b\\|\x9c|$)/g;
const CSI = /(?:\x1b\[|\x9b)[\x30-\x3f]*[\x20-\x2f]*[\x40-\x7e]?/g;
const OTHER_ESCAPE = /\x1b[\x20-\x2f]*[\x30-\x7e]?/g;
// C0 controls, DEL, C1 controls; bidirectional overrides and isolates, which reorder
// what is displayed (a note could make text read differently from what is stored).
const CONTROL = /[\x00-\x1f\x7f-\x9f\u061c\u200e\u200f\u202a-\u202e\u2066-\u2069]/g;
// Whitespace controls become one space, so "a\tb" and "a\nb" stay two words.
const WHITESPACE_CONTROL = /[\t\n\v\f\r]+/g;

/** Removes escape sequences and control characters; tabs and line breaks become one space. */
export function cleanText(text: string): string {
  return text
    .replace(STRING_CONTROL, '')
    .replace(CSI, '')
    .replace(OTHER_ESCAPE, '')
    .replace(WHITESPACE_CONTROL, ' ')
    .replace(CONTROL, '');
}

/** True when the text holds any escape or control character (what `cleanText` would remove). */
export function hasControl(text: string): boolean {
  return /[\x00-\x1f\x7f-\x9f]/.test(text);
}
