import { renameSync, writeFileSync } from 'node:fs';
import { parseCommand, parseRevision, type CommandSpec } from '../args.js';
import type { CommandContext } from '../context.js';
import { jsonText, statusText } from '../output.js';
import { withMachine } from '../store.js';
import { discretiseCompensator, type DiscreteCompensator } from '../../design/discretise.js';
import { formatBlock } from '../../engine/block-syntax.js';
import { UserError } from '../../model/errors.js';
import { formatNumber, parseFrequencyRadS, type FreqUnit } from '../../model/units.js';

const SPEC: CommandSpec = {
  name: 'export',
  usage: [
    'usage: loopledger export AXIS/LOOP [--rate FREQ] [--rev N] [--format text|json|c] [-o FILE]',
    '',
    "Discrete coefficients of a loop's compensator for firmware: one second-order section per block,",
    'Tustin (bilinear) map, pre-warped at the frequency where each block acts (notch centre, lead/lag',
    "centre, low-pass corner). The sample rate is the loop's own unless --rate is given (e.g. --rate 8kHz).",
    'Section form: y[n] = b0 x[n] + b1 x[n-1] + b2 x[n-2] - a1 y[n-1] - a2 y[n-2]; blocks run in series.',
  ].join('\n'),
  options: { rate: { type: 'string' }, rev: { type: 'string' }, format: { type: 'string' }, output: { type: 'string', short: 'o' } },
  positionals: { min: 1, max: 1, what: 'the loop name AXIS/LOOP' },
};

const CAUTION = [
  'CAUTION: these coefficients come from a model. Model margins do not replace verification on the machine.',
  'Try them first at reduced gain, with current, speed and travel limits set and an emergency stop in reach.',
  'Machine-safety standards, local regulations and qualified commissioning practice govern their use.',
];

interface ExportHead {
  readonly loop: string;
  readonly revision: number;
  readonly status: string | null;
  readonly sampleRateHz: number;
}

/** `export`: discretised compensator sections as text, JSON or a C array. */
export async function run(args: string[], ctx: CommandContext): Promise<number> {
  const p = parseCommand(args, SPEC, ctx);
  if (p === null) return 0;
  const format = p.str('format') ?? 'text';
  if (!['text', 'json', 'c'].includes(format)) throw new UserError(`export: --format '${format}' is not one of text, json, c`);
  const ref = p.positionals[0]!;
  const text = await withMachine(ctx, undefined, async (m) => {
    const info = m.loopInfo(ref);
    const revText = p.str('rev');
    const number = revText === undefined ? info.head.number : parseRevision(revText, '--rev');
    const rev = m.revision(ref, number);
    const rateText = p.str('rate');
    const rateHz = rateText !== undefined ? parseFrequencyRadS(rateText, 'hz', '--rate') / (2 * Math.PI) : info.sampleRateHz;
    if (rateHz === null) throw new UserError(`export: loop ${ref} has no sample rate; give one with --rate 8kHz (or set it on the loop)`);
    const discrete = discretiseCompensator(rev.state.compensator.blocks, 1 / rateHz, ref);
    const status = number === info.head.number ? (await m.check([ref])).loops[0]?.status ?? null : null;
    const head: ExportHead = { loop: ref, revision: number, status, sampleRateHz: rateHz };
    const unit = m.settings().unit;
    if (format === 'json') return jsonText(exportJson(head, discrete, unit));
    return format === 'c' ? exportC(head, discrete, unit) : exportText(head, discrete, unit);
  });
  const out = p.str('output');
  if (out === undefined) ctx.out(text);
  else {
    // Write beside the target and rename, so a reader never sees half a file.
    const tmp = `${out}.tmp-${process.pid}`;
    writeFileSync(tmp, text.endsWith('\n') ? text : text + '\n');
    renameSync(tmp, out);
    ctx.out(`wrote ${out}`);
  }
  return 0;
}

/** The JSON form: every number at full precision. */
function exportJson(head: ExportHead, d: DiscreteCompensator, unit: FreqUnit): unknown {
  return {
    ...head,
    sectionForm: 'y[n] = b0 x[n] + b1 x[n-1] + b2 x[n-2] - a1 y[n-1] - a2 y[n-2]',
    blocks: d.blocks.map(({ block, discrete }) => ({ block: formatBlock(block, unit), prewarpRadS: discrete.prewarpRadS, sections: discrete.sections })),
    warnings: d.warnings,
    caution: CAUTION.join(' '),
  };
}

/** The shortest text that reads back as the same double (JavaScript's own number printing). */
const full = (x: number) => String(x);

/** A readable table, one section per line. */
function exportText(head: ExportHead, d: DiscreteCompensator, unit: FreqUnit): string {
  const lines = [
    `${head.loop} revision ${head.revision}${head.status === null ? '' : ` (${statusText(head.status as never)})`}, sampled at ${formatNumber(head.sampleRateHz, 6)} Hz`,
    SPEC.usage.split('\n').at(-1)!,
    '',
  ];
  d.blocks.forEach(({ block, discrete }, i) => {
    for (const q of discrete.sections) {
      lines.push(`${i + 1}. ${formatBlock(block, unit)}`);
      lines.push(`   b0 ${full(q.b0)}  b1 ${full(q.b1)}  b2 ${full(q.b2)}`);
      lines.push(`   a1 ${full(q.a1)}  a2 ${full(q.a2)}`);
    }
  });
  if (d.blocks.length === 0) lines.push('(no blocks: the compensator is a unity gain)');
  for (const w of d.warnings) lines.push(`warning: ${w}`);
  lines.push('', ...CAUTION);
  return lines.join('\n');
}

/** A C array of sections, float64 values written with round-trip precision. */
function exportC(head: ExportHead, d: DiscreteCompensator, unit: FreqUnit): string {
  const ident = head.loop.replace(/[^A-Za-z0-9]/g, '_').toLowerCase();
  const sections = d.blocks.flatMap(({ block, discrete }) => discrete.sections.map((q) => ({ q, label: formatBlock(block, unit) })));
  const rows = sections.map(({ q, label }) => `  { ${[q.b0, q.b1, q.b2, q.a1, q.a2].map(full).join(', ')} }, /* ${label.replace(/\*\//g, '* /')} */`);
  return [
    `/* loopledger export: ${head.loop} revision ${head.revision}, sample rate ${formatNumber(head.sampleRateHz, 6)} Hz.`,
    ' * Each row: { b0, b1, b2, a1, a2 } of y[n] = b0 x[n] + b1 x[n-1] + b2 x[n-2] - a1 y[n-1] - a2 y[n-2];',
    ' * run the rows in series, first row first.',
    ...d.warnings.map((w) => ` * warning: ${w.replace(/\*\//g, '* /')}`),
    ...CAUTION.map((c) => ` * ${c}`),
    ' */',
    `#define ${ident.toUpperCase()}_SECTIONS ${sections.length}`,
    `static const double ${ident}_sections[${Math.max(1, sections.length)}][5] = {`,
    ...(rows.length > 0 ? rows : ['  { 1, 0, 0, 0, 0 }, /* unity gain */']),
    '};',
  ].join('\n');
}
