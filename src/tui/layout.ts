/**
 * Frame geometry. The frame is at most rows-1 tall: a frame as tall as the
 * window makes the terminal scroll by one line on every redraw (flicker, and
 * the scrollback fills with old frames). One line of title, one of footer.
 */

/** Smallest window the screens are laid out for; smaller ones are drawn cut. */
export const MIN_COLUMNS = 40;
export const MIN_ROWS = 10;

export interface FrameSize {
  readonly width: number;
  /** Lines of the whole frame (title + body + footer). */
  readonly height: number;
  /** Lines between title and footer. */
  readonly body: number;
}

/** The frame for a window of `columns` x `rows` (undefined sizes: 80x24). */
export function frameSize(columns: number | undefined, rows: number | undefined): FrameSize {
  const width = Math.max(MIN_COLUMNS, columns && columns > 0 ? columns : 80);
  const height = Math.max(MIN_ROWS, (rows && rows > 0 ? rows : 24) - 1);
  return { width, height, body: height - 2 };
}

/** First row to show so that `selected` is visible in `visible` rows, keeping it near the middle. */
export function windowTop(total: number, selected: number, visible: number): number {
  if (total <= visible || selected < 0) return 0;
  return Math.max(0, Math.min(selected - Math.floor(visible / 2), total - visible));
}

/** How the loop view arranges its panes: one at a time, all stacked, or two columns. */
export type PaneArrangement = 'tabs' | 'stacked' | 'columns';

/** One pane at a time below 44 rows; two columns from 150 columns and 40 rows; else stacked. */
export function paneArrangement(width: number, body: number): PaneArrangement {
  if (width >= 150 && body >= 38) return 'columns';
  if (body >= 42) return 'stacked';
  return 'tabs';
}
