import { formatFrequency, formatNumber, type FreqUnit } from '../model/units.js';

/**
 * The worksheet of a design: the numbers of each step of a procedure, in order,
 * with their units, so a reviewer can redo the design by hand. Values are in base
 * units (rad/s, s, deg, dB); text steps carry a word instead of a number.
 */
export interface WorksheetStep {
  readonly label: string;
  readonly value: number | string | null;
  /** 'rad/s', 's', 'deg', 'dB', '1/s', '1/s^2' or '' for a plain number. */
  readonly unit: string;
}

/** Collects worksheet steps; `section` starts a titled group (hand procedure, refinement, ...). */
export class Worksheet {
  readonly steps: WorksheetStep[] = [];

  /** Adds one numbered step. */
  add(label: string, value: number | string | null, unit = ''): this {
    this.steps.push({ label, value, unit });
    return this;
  }

  /** Adds a heading line (no value). */
  section(title: string): this {
    this.steps.push({ label: title, value: null, unit: 'section' });
    return this;
  }
}

/** One step's value as text, frequencies in the display unit. */
export function formatStepValue(s: WorksheetStep, unit: FreqUnit): string {
  if (s.value === null) return '-';
  if (typeof s.value === 'string') return s.value;
  if (s.unit === 'rad/s') return formatFrequency(s.value, unit, 4);
  const n = formatNumber(s.value, 4);
  return s.unit === '' ? n : `${n} ${s.unit}`;
}

/** The worksheet as aligned plain-text lines (used on screen and in revision notes). */
export function formatWorksheet(steps: readonly WorksheetStep[], unit: FreqUnit): string[] {
  const width = Math.min(52, Math.max(0, ...steps.filter((s) => s.unit !== 'section').map((s) => s.label.length)));
  return steps.map((s) =>
    s.unit === 'section' ? `${s.label}:` : `  ${s.label.padEnd(width)}  ${formatStepValue(s, unit)}`,
  );
}
