import { fit, fitRight } from './text.js';

/**
 * A small column layout: fixed-width columns in order, one flexible last column
 * that takes what is left, and optional columns dropped (lowest priority first)
 * when the window is too narrow. Columns are separated by one space.
 */
export interface Column<R> {
  readonly title: string;
  readonly width: number;
  readonly align: 'left' | 'right';
  /** Higher is kept longer; undefined = never dropped. */
  readonly dropPriority?: number;
  readonly cell: (row: R) => string;
}

/** The columns that fit `width`, the flexible last one getting the rest (at least `minFlex`). */
export function layoutColumns<R>(cols: readonly Column<R>[], flex: Column<R>, width: number, minFlex = 8): Column<R>[] {
  const kept = [...cols];
  const used = () => kept.reduce((n, c) => n + c.width + 1, 0);
  while (used() + minFlex > width) {
    let drop = -1;
    kept.forEach((c, i) => {
      if (c.dropPriority !== undefined && (drop < 0 || c.dropPriority < kept[drop]!.dropPriority!)) drop = i;
    });
    if (drop < 0) break;
    kept.splice(drop, 1);
  }
  return [...kept, { ...flex, width: Math.max(0, width - used()) }];
}

/** One table line from a row (or the titles when `row` is null). */
export function tableLine<R>(cols: readonly Column<R>[], row: R | null): string {
  return cols
    .map((c) => {
      const text = row === null ? c.title : c.cell(row);
      return c.align === 'right' ? fitRight(text, c.width) : fit(text, c.width);
    })
    .join(' ')
    .trimEnd();
}
