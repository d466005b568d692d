import type { LoopStatus } from '../model/requirements.js';

/**
 * Loop status as shown: a word and a single-width ASCII glyph, so it reads the
 * same in monochrome, on a colour-blind screen and in a pasted log. Colour is
 * only ever added on top.
 */
const GLYPH: Record<LoopStatus, string> = { pass: '+', fail: 'x', unstable: '!', error: '?' };

/** The glyph of a status: `+` pass, `x` fail, `!` unstable, `?` error. */
export function statusGlyph(s: LoopStatus): string {
  return GLYPH[s];
}

/** "x fail", "! unstable": the status as glyph and word. */
export function statusLabel(s: LoopStatus): string {
  return `${GLYPH[s]} ${s}`;
}

/** The widest status label, for column sizing. */
export const STATUS_LABEL_WIDTH = Math.max(...(Object.keys(GLYPH) as LoopStatus[]).map((s) => statusLabel(s).length));

/** The ink colour name for a status (ignored when colour is off). */
export function statusColor(s: LoopStatus): 'green' | 'red' | 'magenta' | 'yellow' {
  return s === 'pass' ? 'green' : s === 'fail' ? 'red' : s === 'unstable' ? 'magenta' : 'yellow';
}

/** Check mark for one requirement outcome: a word too, never colour alone. */
export function outcomeLabel(pass: boolean): string {
  return pass ? '+ ok' : 'x miss';
}
