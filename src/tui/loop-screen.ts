import type { FreqUnit } from '../model/units.js';
import { blockLines } from './block-lines.js';
import { bodeSketch } from './bode-sketch.js';
import { checklistLines } from './checklist-lines.js';
import type { DashState } from './dash-state.js';
import { headlineText } from './headline-text.js';
import { paneArrangement } from './layout.js';
import { cleanText } from './sanitize.js';
import { statusLabel } from './status.js';
import { stepSketch } from './step-sketch.js';
import { styled, type StyledLine } from './styled.js';
import { fit, truncate } from './text.js';
import type { LoopDetailVM } from './view-model.js';
import { formatWhen } from './when.js';

/** A screen's lines and what the controller needs to scroll it. */
export interface ScreenLines {
  readonly lines: StyledLine[];
  /** Lines of scrollable content, and how many are shown at once. */
  readonly contentRows: number;
  readonly pageRows: number;
  readonly panes: number;
}

export const LOOP_PANES = ['checks', 'Bode', 'step'] as const;

/** Per-variant stability and headline numbers, then the checklist, then the blocks. */
function checksPane(d: LoopDetailVM, unit: FreqUnit, width: number): StyledLine[] {
  const variants: StyledLine[] = d.variants.map((v) => ({
    text: truncate(`${fit(cleanText(v.name), 10)} ${v.error ? `? error: ${cleanText(v.error)}` : `${v.stable ? 'stable  ' : '! UNSTABLE'}  ${headlineText(v.headline, unit)}`}`, width),
    tone: v.error ? 'error' : v.stable ? 'plain' : 'unstable',
  }));
  const checks = checklistLines(d.checks, unit, width);
  return [
    ...variants,
    { text: '' },
    { text: truncate(checks[0]!, width), tone: 'dim' },
    ...checks.slice(1).map((text) => ({ text, tone: text.startsWith('x') ? ('fail' as const) : ('plain' as const) })),
    { text: '' },
    { text: 'compensator (blocks in series)', tone: 'dim' },
    ...styled(blockLines(d.blocks, unit, width)),
  ];
}

/** The Bode sketch of the selected variant. */
function bodePane(d: LoopDetailVM, s: DashState, unit: FreqUnit, width: number, height: number, colour: boolean): StyledLine[] {
  const b = d.bode[s.variant % Math.max(1, d.bode.length)];
  if (!b) return [{ text: 'no frequency response: ' + (d.error ? cleanText(d.error) : 'the loop has not been analysed'), tone: 'error' }];
  return styled(bodeSketch(b, { width, height, unit, colour }));
}

/** The step sketch of the selected variant. */
function stepPane(d: LoopDetailVM, s: DashState, unit: FreqUnit, width: number, height: number, colour: boolean): StyledLine[] {
  const st = d.step[s.variant % Math.max(1, d.step.length)];
  if (!st) return [{ text: d.status === 'unstable' ? 'no step response: the closed loop is unstable' : 'no step response for this loop', tone: 'dim' }];
  return styled(stepSketch(st, { width, height, unit, colour }));
}

/** The two header lines: who, what, status; plants and variants. */
function loopHeader(d: LoopDetailVM, s: DashState, width: number, nowMs: number): StyledLine[] {
  const first = `${cleanText(d.id)}  r${d.revision}  ${statusLabel(d.status)}  by ${cleanText(d.author)}, ${formatWhen(d.at, nowMs)}: ${cleanText(d.note)}`;
  const variant = d.variants.length > 1 ? `  variant ${cleanText(d.variants[s.variant % d.variants.length]!.name)} of ${d.variants.length} (v)` : '';
  const plants = d.plants.map((p) => `${cleanText(p.variant)}: ${cleanText(p.text)}`).join('  ');
  const inner = d.innerId ? `  inner ${cleanText(d.innerId)}` : '';
  return [
    { text: truncate(first, width), tone: d.status },
    { text: truncate(`plant ${plants}${inner}${variant}`, width), tone: 'dim' },
  ];
}

/**
 * The loop view. Below 44 rows one pane at a time (Tab), with a tab line whose
 * brackets show the pane; taller windows stack every pane; wide ones put the
 * checks beside the sketches. Content scrolls with j/k.
 */
export function loopScreen(d: LoopDetailVM, s: DashState, unit: FreqUnit, width: number, height: number, colour: boolean, nowMs: number): ScreenLines {
  const head = loopHeader(d, s, width, nowMs);
  const arrangement = paneArrangement(width, height);
  let content: StyledLine[];
  let panes = 1;
  const room = height - head.length - 1;
  if (arrangement === 'tabs') {
    panes = LOOP_PANES.length;
    const pane = s.pane % panes;
    const tabs = LOOP_PANES.map((p, i) => (i === pane ? `[${p}]` : ` ${p} `)).join(' ') + '   Tab: next pane';
    head.push({ text: truncate(tabs, width), tone: 'title' });
    content = pane === 0 ? checksPane(d, unit, width) : pane === 1 ? bodePane(d, s, unit, width, room, colour) : stepPane(d, s, unit, width, room, colour);
  } else if (arrangement === 'stacked') {
    head.push({ text: '' });
    content = [...checksPane(d, unit, width), { text: '' }, ...bodePane(d, s, unit, width, 20, colour), { text: '' }, ...stepPane(d, s, unit, width, 14, colour)];
  } else {
    head.push({ text: '' });
    const left = Math.floor((width - 3) / 2);
    const right = width - 3 - left;
    const l = checksPane(d, unit, left);
    // The sketches share the height: the Bode sketch carries more (two charts), the step the rest.
    const bodeRows = Math.max(16, Math.floor((room - 1) * 0.6));
    const r = [...bodePane(d, s, unit, right, bodeRows, false), { text: '' }, ...stepPane(d, s, unit, right, Math.max(10, room - 1 - bodeRows), false)];
    content = Array.from({ length: Math.max(l.length, r.length) }, (_, i) => ({
      text: fit(l[i]?.text ?? '', left) + ' | ' + (r[i]?.text ?? ''),
    }));
  }
  const top = Math.max(0, Math.min(s.scroll, content.length - room));
  return { lines: [...head, ...content.slice(top, top + room)], contentRows: content.length, pageRows: room, panes };
}
