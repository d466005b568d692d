import { UserError } from '../../model/errors.js';
import { formatFrequency, parseFrequencyRadS, splitNumberSuffix, toDisplayFrequency, type FreqUnit } from '../../model/units.js';
import { dispatch, JSON_OPT, NOTE, parseCommand, type CommandSpec } from '../args.js';
import type { CommandContext } from '../context.js';
import { jsonText, shortTime, table } from '../output.js';
import { runChange, withMachine } from '../store.js';
import { show } from './loop-show.js';

const ADD: CommandSpec = {
  name: 'loop add',
  usage: [
    'usage: loopledger loop add AXIS/LOOP --plant EXPR [--variant NAME] [--inner AXIS/LOOP] [--sample-rate FREQ] [-m NOTE] [--author NAME] [--json]',
    '',
    'Adds a feedback loop to an axis with its first plant model (revision 1, unity-gain compensator).',
    '  --plant EXPR        the plant in s, e.g. "400/(s*(s+20))" or "3e4/(s^2+12*s+9e4)*exp(-0.0002*s)"',
    '  --variant NAME      name of this plant variant (default nominal)',
    '  --inner AXIS/LOOP   the loop nested inside this one: this plant then follows the closed inner loop',
    '  --sample-rate FREQ  e.g. 8kHz; a bare number is in the store\'s unit',
  ].join('\n'),
  options: { plant: { type: 'string' }, variant: { type: 'string' }, inner: { type: 'string' }, 'sample-rate': { type: 'string' }, ...NOTE, ...JSON_OPT },
  positionals: { min: 1, max: 1, what: 'the loop name AXIS/LOOP' },
};

const LIST: CommandSpec = {
  name: 'loop list',
  usage: 'usage: loopledger loop list [--json]\n\nLists every loop with its cascade, sample rate and latest revision (no analysis; see check).',
  options: { ...JSON_OPT },
  positionals: { min: 0, max: 0, what: '' },
};

const SHOW: CommandSpec = {
  name: 'loop show',
  usage: 'usage: loopledger loop show AXIS/LOOP [--json]\n\nShows one loop: plants, compensator, requirements per variant, metrics and status.',
  options: { ...JSON_OPT },
  positionals: { min: 1, max: 1, what: 'the loop name AXIS/LOOP' },
};

const USAGE = 'usage: loopledger loop add AXIS/LOOP --plant EXPR ... | loop list [--json] | loop show AXIS/LOOP [--json]';

/** `loop add`, `loop list`, `loop show`. */
export async function run(args: string[], ctx: CommandContext): Promise<number> {
  return dispatch(args, ctx, 'loop', USAGE, {
    add: (r) => add(r, ctx),
    list: (r) => list(r, ctx),
    show: async (r) => {
      const p = parseCommand(r, SHOW, ctx);
      return p === null ? 0 : show(p, ctx);
    },
  });
}

async function add(args: string[], ctx: CommandContext): Promise<number> {
  const p = parseCommand(args, ADD, ctx);
  if (p === null) return 0;
  const plant = p.str('plant');
  if (plant === undefined) throw new UserError(`loop add: give the plant with --plant EXPR, e.g. --plant "400/(s*(s+20))"`);
  const ref = p.positionals[0]!;
  return runChange(ctx, p, p.str('author'), (m) => {
    const rate = p.str('sample-rate');
    const sampleRateHz = rate === undefined ? null : parseRateHz(rate, m.settings().unit);
    const note = p.str('message');
    const variant = p.str('variant');
    return m.addLoop(ref, { plant, inner: p.str('inner') ?? null, sampleRateHz, ...(variant === undefined ? {} : { variant }), ...(note === undefined ? {} : { note }) });
  });
}

/** A sample rate in Hz; typed in Hz (or kHz) it is kept exactly, not sent through rad/s and back. */
function parseRateHz(text: string, unit: FreqUnit): number {
  const wRadS = parseFrequencyRadS(text, unit, '--sample-rate'); // validates the number and the unit
  const { value, suffix } = splitNumberSuffix(text, '--sample-rate');
  if (suffix === 'hz' || (suffix === '' && unit === 'hz')) return value;
  if (suffix === 'khz') return value * 1e3;
  return toDisplayFrequency(wRadS, 'hz');
}

async function list(args: string[], ctx: CommandContext): Promise<number> {
  const p = parseCommand(args, LIST, ctx);
  if (p === null) return 0;
  return withMachine(ctx, undefined, (m) => {
    const loops = m.listLoops();
    const unit = m.settings().unit;
    if (p.flag('json')) ctx.out(jsonText(loops));
    else if (loops.length === 0) ctx.out("no loops yet; add one with 'loopledger loop add AXIS/LOOP --plant EXPR'");
    else {
      const rows = loops.map((l) => [
        l.ref, l.inner ?? '-', l.sampleRateHz === null ? '-' : formatFrequency(l.sampleRateHz * 2 * Math.PI, unit),
        String(l.head.number), shortTime(l.head.time), l.head.author, l.head.summary,
      ]);
      ctx.out(table([['loop', 'inner', 'rate', 'rev', 'changed', 'by', 'last change'], ...rows], [3]).join('\n'));
    }
    return 0;
  });
}
