/**
 * Fitting text into terminal cells. Every screen line is cut to the frame width
 * rather than wrapped: a wrapped line pushes the frame past the window and the
 * terminal scrolls. Widths count code points; the sanitiser has removed controls,
 * and the glyphs we draw ourselves (box drawing, `…`) are single-width.
 */

export const ELLIPSIS = '…';

/** The number of terminal cells a (clean) string takes, counted by code point. */
export function cellWidth(text: string): number {
  let n = 0;
  for (const _ of text) n++;
  return n;
}

/** Cuts a line to `width` cells, ending with `…` when something was cut. */
export function truncate(text: string, width: number): string {
  if (width <= 0) return '';
  const chars = Array.from(text);
  if (chars.length <= width) return text;
  return chars.slice(0, width - 1).join('') + ELLIPSIS;
}

/** Cuts or pads (with spaces on the right) to exactly `width` cells. */
export function fit(text: string, width: number): string {
  const t = truncate(text, width);
  return t + ' '.repeat(Math.max(0, width - cellWidth(t)));
}

/** Cuts or pads on the left to exactly `width` cells: numbers line up on their last digit. */
export function fitRight(text: string, width: number): string {
  const t = truncate(text, width);
  return ' '.repeat(Math.max(0, width - cellWidth(t))) + t;
}

/** Cuts every line to `width` cells. */
export function truncateLines(lines: readonly string[], width: number): string[] {
  return lines.map((l) => truncate(l, width));
}
