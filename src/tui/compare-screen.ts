import { toDisplayFrequency, formatNumber, formatTime, type FreqUnit } from '../model/units.js';
import { blockText } from './block-lines.js';
import { bodeSketch } from './bode-sketch.js';
import type { DashState } from './dash-state.js';
import type { ScreenLines } from './loop-screen.js';
import { cleanText } from './sanitize.js';
import { statusLabel } from './status.js';
import { styled, type StyledLine } from './styled.js';
import { fit, fitRight, truncate } from './text.js';
import type { CompareVM, DeltaVM } from './view-model.js';

const METRIC_LABEL: Record<string, string> = {
  phaseMarginDeg: 'phase margin deg',
  gainMarginDb: 'gain margin dB',
  crossoverRadS: 'crossover',
  delayMarginS: 'delay margin',
  peakSensitivity: 'peak sensitivity Ms',
  peakComplementary: 'peak compl. Mt',
  bandwidthRadS: 'bandwidth',
  kv: 'Kv 1/s',
  'step.overshootPct': 'overshoot %',
  'step.riseTimeS': 'rise time',
  'step.settlingTimeS': 'settling time',
  'step.peakEffort': 'peak effort',
};

/** A metric value in the display unit its key names (…RadS a frequency, …S a time). */
export function deltaValue(metric: string, v: number | null, unit: FreqUnit, signed = false): string {
  if (v === null) return '-';
  const sign = signed && v > 0 ? '+' : '';
  if (metric.endsWith('RadS')) return sign + formatNumber(toDisplayFrequency(v, unit), 3);
  if (metric.endsWith('S')) return sign + formatTime(v);
  return sign + formatNumber(v, 3);
}

/** The label of a metric key, with the frequency unit where it is one. */
function metricLabel(metric: string, unit: FreqUnit): string {
  const base = METRIC_LABEL[metric] ?? metric;
  return metric.endsWith('RadS') ? `${base} ${unit === 'hz' ? 'Hz' : 'rad/s'}` : base;
}

/** The metric table of one variant: from, to, change. */
function deltaLines(deltas: readonly DeltaVM[], c: CompareVM, unit: FreqUnit, width: number): StyledLine[] {
  const head = `${fit('metric [' + cleanText(deltas[0]?.variant ?? '') + ']', 24)} ${fitRight('r' + c.a.revision, 9)} ${fitRight('r' + c.b.revision, 9)} ${fitRight('change', 9)}`;
  return [
    { text: truncate(head, width), tone: 'dim' },
    ...deltas.map((d) => ({
      text: truncate(`${fit(metricLabel(d.metric, unit), 24)} ${fitRight(deltaValue(d.metric, d.from, unit), 9)} ${fitRight(deltaValue(d.metric, d.to, unit), 9)} ${fitRight(deltaValue(d.metric, d.delta, unit, true), 9)}`, width),
    })),
  ];
}

/** The two compensators side by side, block by block; `~` marks a row that differs. */
function blockTable(c: CompareVM, unit: FreqUnit, width: number): StyledLine[] {
  const a = c.blocksA.map((b) => blockText(b, unit));
  const b = c.blocksB.map((x) => blockText(x, unit));
  const col = Math.max(10, Math.floor((width - 6) / 2));
  const rows: StyledLine[] = [{ text: truncate(`    ${fit('compensator r' + c.a.revision, col)}  ${'r' + c.b.revision}`, width), tone: 'dim' }];
  for (let i = 0; i < Math.max(a.length, b.length, 1); i++) {
    const x = a[i] ?? (i === 0 && a.length === 0 ? '(unity)' : '');
    const y = b[i] ?? (i === 0 && b.length === 0 ? '(unity)' : '');
    const differs = x !== y;
    rows.push({ text: truncate(`${differs ? ' ~ ' : '   '} ${fit(x, col)}  ${y}`, width), tone: differs ? 'info' : 'plain' });
  }
  return rows;
}

/**
 * Two revisions compared: status then and now, what changed (compensator,
 * requirements, plants: old -> new), the metric table of the chosen variant,
 * and both Bode sketches drawn over one another.
 */
export function compareScreen(c: CompareVM, s: DashState, unit: FreqUnit, width: number, height: number, colour: boolean): ScreenLines {
  const variants = [...new Set(c.deltas.map((d) => d.variant))];
  const variant = variants[s.variant % Math.max(1, variants.length)] ?? '';
  const head: StyledLine[] = [
    {
      text: truncate(`${cleanText(c.loopId)}  r${c.a.revision} ${statusLabel(c.statusA)}  ->  r${c.b.revision} ${statusLabel(c.statusB)}${variants.length > 1 ? `   variant ${cleanText(variant)} (v)` : ''}`, width),
      tone: c.statusB,
    },
  ];
  const listed = c.changes.filter((ch) => ch.what !== 'compensator');
  const changes: StyledLine[] = c.changes.length === 0
    ? [{ text: 'no change to plant, requirements or compensator', tone: 'dim' }]
    : listed.flatMap((ch) => {
        const what = `${ch.what}${ch.key ? ' ' + cleanText(ch.key) : ''}`;
        const from = ch.from === null ? '(none)' : cleanText(ch.from);
        const to = ch.to === null ? '(none)' : cleanText(ch.to);
        const one = `${what}: ${from} -> ${to}`;
        if (one.length <= width) return [{ text: one, tone: 'info' as const }];
        return [
          { text: truncate(`${what}:`, width), tone: 'dim' as const },
          { text: truncate(`  r${c.a.revision}  ${from}`, width) },
          { text: truncate(`  r${c.b.revision}  ${to}`, width), tone: 'info' as const },
        ];
      });
  const bi = Math.max(0, c.bodeB.findIndex((b) => b.variant === variant));
  const bodeA = c.bodeA.find((b) => b.variant === variant) ?? c.bodeA[bi];
  const bodeB = c.bodeB[bi];
  const sketch = bodeB
    ? bodeSketch(bodeB, { width, height: 14, unit, colour, legend: [`r${c.b.revision}`, `r${c.a.revision}`] }, bodeA)
    : ['no frequency response to compare'];
  const content: StyledLine[] = [
    ...blockTable(c, unit, width),
    ...changes,
    { text: '' },
    ...deltaLines(c.deltas.filter((d) => d.variant === variant), c, unit, width),
    { text: '' },
    ...styled(sketch),
  ];
  const room = Math.max(1, height - head.length);
  const top = Math.max(0, Math.min(s.scroll, content.length - room));
  return { lines: [...head, ...content.slice(top, top + room)], contentRows: content.length, pageRows: room, panes: 1 };
}
