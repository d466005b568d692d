import type { LoopStatus } from '../model/requirements.js';

/**
 * A screen line and how it should look. Tones map to colours only when colour
 * is on; the text itself always carries the meaning (status words, `>` marker).
 */
export type Tone = 'plain' | 'title' | 'dim' | 'selected' | 'error' | 'info' | LoopStatus;

export interface StyledLine {
  readonly text: string;
  readonly tone?: Tone;
}

/** Plain lines as styled lines of one tone. */
export function styled(lines: readonly string[], tone: Tone = 'plain'): StyledLine[] {
  return lines.map((text) => ({ text, tone }));
}

/** The selection marker column: `> ` on the selected row, two spaces elsewhere. */
export function marker(selected: boolean): string {
  return selected ? '> ' : '  ';
}
