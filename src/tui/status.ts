import { STATUS_GLYPH, type LoopStatus } from '../model/requirements.js';

/**
 * Loop status as shown: a word and a single-width ASCII glyph, so it reads the
 * same in monochrome, on a colour-blind screen and in a pasted log. Colour is
 * only ever added on top.
 */
const GLYPH = STATUS_GLYPH;

/** "x fail", "! unstable": the status as glyph and word. */
export function statusLabel(s: LoopStatus): string {
  return `${GLYPH[s]} ${s}`;
}

/** The widest status label, for column sizing. */
export const STATUS_LABEL_WIDTH = Math.max(...(Object.keys(GLYPH) as LoopStatus[]).map((s) => statusLabel(s).length));

/** Check mark for one requirement outcome: a word too, never colour alone. */
export function outcomeLabel(pass: boolean): string {
  return pass ? '+ ok' : 'x miss';
}
