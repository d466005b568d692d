import { formatBlock } from '../../engine/block-syntax.js';
import type { LoopDetail, VariantResult } from '../../engine/index.js';
import { formatMetricValue, formatRequirement } from '../../engine/requirement-syntax.js';
import type { LoopMetrics } from '../../model/metrics.js';
import type { MetricKey } from '../../model/requirements.js';
import { formatFrequency, type FreqUnit } from '../../model/units.js';
import type { Parsed } from '../args.js';
import type { CommandContext } from '../context.js';
import { jsonText, shortTime, statusText, table } from '../output.js';
import { withMachine } from '../store.js';

/** `loop show AXIS/LOOP`: everything about one loop, per plant variant. */
export async function show(p: Parsed, ctx: CommandContext): Promise<number> {
  return withMachine(ctx, undefined, async (m) => {
    const d = await m.loopDetail(p.positionals[0]!);
    if (p.flag('json')) ctx.out(jsonText(d));
    else ctx.out(detailLines(d, m.settings().unit).join('\n'));
    return 0;
  });
}

/** The plain view of a loop. */
export function detailLines(d: LoopDetail, unit: FreqUnit): string[] {
  const { info, state, result } = d;
  const where = [`axis ${info.axis}`];
  if (info.inner) where.push(`around ${info.inner}`);
  if (info.outer.length > 0) where.push(`inside ${info.outer.join(', ')}`);
  if (info.sampleRateHz !== null) where.push(`sampled at ${formatFrequency(info.sampleRateHz * 2 * Math.PI, unit)}`);
  const h = info.head;
  const lines = [
    `${info.ref}  (${where.join(', ')})`,
    `revision ${h.number}, ${shortTime(h.time)} by ${h.author}: ${h.summary}${h.note ? ` -- ${h.note}` : ''}`,
    `status: ${statusText(result.status)}${result.status === 'pass' ? '' : ` -- ${result.summary.replace(/^(fail|error): /, '')}`}`,
    '',
    ...Object.entries(state.plants).map(([v, pl]) => `plant ${v}: ${pl.text}`),
    `compensator: ${state.compensator.blocks.map((b) => formatBlock(b, unit)).join(' ') || '(unity gain)'}${state.compensator.ideal ? ' (ideal)' : ''}`,
  ];
  const vs = result.variants;
  if (state.requirements.length > 0) {
    const rows = state.requirements.map((r) => [
      formatRequirement(r, unit),
      ...vs.map((v) => {
        const o = v.requirements.find((x) => x.requirement.metric === r.metric && x.requirement.op === r.op);
        if (!o) return '-';
        return `${o.value === null ? (o.reason ?? '-') : formatMetricValue(r.metric, o.value, unit)} ${o.pass ? 'ok' : 'MISSED'}`;
      }),
    ]);
    lines.push('', ...table([['requirement', ...vs.map((v) => v.variant)], ...rows]));
  } else lines.push('', "no requirements yet; add some with 'loopledger spec'");
  lines.push('', ...table([['metric', ...vs.map((v) => v.variant)], ...METRIC_ROWS.map(([label, get]) => [label, ...vs.map((v) => cell(v, get, unit))])]));
  const warnings = [...new Set(vs.flatMap((v) => [...v.warnings, ...(v.error ? [`${v.variant}: ${v.error}`] : [])]))];
  if (warnings.length > 0) lines.push('', 'notes:', ...warnings.map((w) => `  ${w}`));
  return lines;
}

type Getter = (m: LoopMetrics, unit: FreqUnit) => string;
const f = (k: MetricKey, x: number | null | undefined, unit: FreqUnit) => formatMetricValue(k, x ?? null, unit);
const at = (x: number | null, unit: FreqUnit) => (x === null ? '' : ` at ${formatFrequency(x, unit)}`);

const METRIC_ROWS: readonly [string, Getter][] = [
  ['stable', (m) => (m.stable ? 'yes' : 'NO')],
  ['phase margin', (m, u) => f('pm', m.phaseMarginDeg, u) + at(m.phaseMarginAtRadS, u)],
  ['gain margin', (m, u) => f('gm', m.gainMarginDb, u) + at(m.gainMarginAtRadS, u)],
  ['crossovers', (m, u) => m.gainCrossoversRadS.map((w) => formatFrequency(w, u)).join(' ') || '-'],
  ['bandwidth', (m, u) => f('bw', m.bandwidthRadS, u)],
  ['delay margin', (m, u) => f('dm', m.delayMarginS, u)],
  ['peak |S|', (m, u) => f('ms', m.peakSensitivity, u)],
  ['peak |T|', (m, u) => f('mt', m.peakComplementary, u)],
  ['overshoot', (m, u) => f('os', m.step?.overshootPct, u)],
  ['rise time', (m, u) => f('tr', m.step?.riseTimeS, u)],
  ['settling 2%', (m, u) => f('ts', m.step?.settlingTimeS, u)],
  ['peak effort', (m, u) => f('effort', m.step?.peakEffort, u)],
  ['system type', (m) => String(m.systemType)],
  ['Kp Kv Ka', (m, u) => `${f('kp', m.kp, u)} ${f('kv', m.kv, u)} ${f('ka', m.ka, u)}`],
];

function cell(v: VariantResult, get: Getter, unit: FreqUnit): string {
  return v.metrics === null ? 'error' : get(v.metrics, unit);
}
