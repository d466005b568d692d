import type { LoopDiff, MetricDelta } from '../../engine/index.js';
import { formatMetricValue } from '../../engine/requirement-syntax.js';
import type { MetricKey } from '../../model/requirements.js';
import { formatNumber, type FreqUnit } from '../../model/units.js';
import { JSON_OPT, parseCommand, parseRevision, type CommandSpec } from '../args.js';
import type { CommandContext } from '../context.js';
import { jsonText, statusText, table } from '../output.js';
import { withMachine } from '../store.js';

const SPEC: CommandSpec = {
  name: 'diff',
  usage: [
    'usage: loopledger diff AXIS/LOOP REV_A REV_B [--json]',
    '',
    'What changed between two revisions of a loop, and what it did to the metrics',
    '(both analysed with the inner loops as they are today).',
  ].join('\n'),
  options: { ...JSON_OPT },
  positionals: { min: 3, max: 3, what: 'AXIS/LOOP and two revisions REV_A REV_B' },
};

/** `diff`: state changes and metric deltas between two revisions. */
export async function run(args: string[], ctx: CommandContext): Promise<number> {
  const p = parseCommand(args, SPEC, ctx);
  if (p === null) return 0;
  const ref = p.positionals[0]!;
  const a = parseRevision(p.positionals[1]!, 'REV_A');
  const b = parseRevision(p.positionals[2]!, 'REV_B');
  return withMachine(ctx, undefined, async (m) => {
    const d = await m.diff(ref, a, b);
    ctx.out(p.flag('json') ? jsonText(d) : diffLines(d, m.settings().unit).join('\n'));
    return 0;
  });
}

/** Metric keys of a diff, as the requirement formatter knows them (for units), with a label. */
const LABELS: Readonly<Record<string, [string, MetricKey | null]>> = {
  phaseMarginDeg: ['phase margin', 'pm'], gainMarginDb: ['gain margin', 'gm'], crossoverRadS: ['crossover', 'fc'],
  delayMarginS: ['delay margin', 'dm'], peakSensitivity: ['peak |S|', 'ms'], peakComplementary: ['peak |T|', 'mt'],
  bandwidthRadS: ['bandwidth', 'bw'], kv: ['Kv', 'kv'], 'step.overshootPct': ['overshoot', 'os'],
  'step.riseTimeS': ['rise time', 'tr'], 'step.settlingTimeS': ['settling 2%', 'ts'], 'step.peakEffort': ['peak effort', 'effort'],
};

/** The plain view of a diff. */
export function diffLines(d: LoopDiff, unit: FreqUnit): string[] {
  const lines = [
    `${d.loop}: revision ${d.from.number} (${statusText(d.statusFrom)}) -> revision ${d.to.number} (${statusText(d.statusTo)})`,
    ...(d.changes.length === 0 ? ['  no change in plants, requirements or compensator'] : d.changes.map((c) => `  ${c.what}${c.key ? ` ${c.key}` : ''}: ${c.from ?? '(none)'} -> ${c.to ?? '(none)'}`)),
  ];
  const many = new Set(d.metrics.map((x) => x.variant)).size > 1;
  const rows = d.metrics.map((x) => metricRow(x, unit, many));
  if (rows.length > 0) lines.push('', ...table([['metric', `rev ${d.from.number}`, `rev ${d.to.number}`, 'change'], ...rows], [1, 2, 3]));
  return lines;
}

function metricRow(x: MetricDelta, unit: FreqUnit, many: boolean): string[] {
  const [label, key] = LABELS[x.metric] ?? [x.metric, null];
  const show = (v: number | null) => (key === null ? (v === null ? '-' : formatNumber(v)) : formatMetricValue(key, v, unit));
  const change = x.delta === null ? '' : x.delta === 0 ? '=' : (x.delta > 0 ? '+' : '') + show(x.delta);
  return [`${label}${many ? ` (${x.variant})` : ''}`, show(x.from), show(x.to), change];
}
