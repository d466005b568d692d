import { formatBlock } from '../engine/block-syntax.js';
import type { Block, BlockKind } from '../model/blocks.js';
import type { FreqUnit } from '../model/units.js';
import { cleanText } from './sanitize.js';
import { fit, truncate } from './text.js';

const KIND_NAME: Record<BlockKind, string> = {
  gain: 'gain',
  integrator: 'integrator',
  pi: 'PI',
  lead: 'phase lead',
  lag: 'phase lag',
  pid: 'PID, filtered derivative',
  notch: 'notch',
  lowpass1: 'low-pass, 1st order',
  lowpass2: 'low-pass, 2nd order',
  expr: 'rational expression',
};

/** A block in the `comp set` syntax for the display unit, cleaned for the screen. */
export function blockText(b: Block, unit: FreqUnit): string {
  return cleanText(formatBlock(b, unit));
}

/** The compensator's blocks, numbered in series order, with what each one is. */
export function blockLines(blocks: readonly Block[], unit: FreqUnit, width: number): string[] {
  if (blocks.length === 0) return ['no blocks: the compensator is unity gain'];
  const texts = blocks.map((b) => blockText(b, unit));
  const textWidth = Math.min(Math.max(...texts.map((t) => t.length)), Math.max(12, width - 28));
  return blocks.map((b, i) => truncate(`${String(i + 1).padStart(2)}  ${fit(texts[i]!, textWidth)}  ${KIND_NAME[b.kind]}`, width).trimEnd());
}
