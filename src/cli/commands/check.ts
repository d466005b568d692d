import { JSON_OPT, parseCommand, type CommandSpec } from '../args.js';
import type { CommandContext } from '../context.js';
import { jsonText } from '../output.js';
import { resultRows } from '../present.js';
import { withMachine } from '../store.js';

const SPEC: CommandSpec = {
  name: 'check',
  usage: [
    'usage: loopledger check [AXIS/LOOP...] [--json]',
    '',
    'Checks every requirement of the named loops (default: all) for every plant variant and prints',
    'one line per loop: status (+ pass, x fail, ! unstable, ? error), revision, phase margin, gain',
    'margin, crossover and bandwidth (the worst over the variants), and the worst missed requirement.',
    'Exit status: 0 when all pass, 1 when any loop fails, is unstable or cannot be analysed, 2 on bad input.',
  ].join('\n'),
  options: { ...JSON_OPT },
  positionals: { min: 0, max: Infinity, what: '' },
};

/** `check`: the truthful overview. Fresh stored results are used as they are; nothing is parsed. */
export async function run(args: string[], ctx: CommandContext): Promise<number> {
  const p = parseCommand(args, SPEC, ctx);
  if (p === null) return 0;
  return withMachine(ctx, undefined, async (m) => {
    const report = await m.check(p.positionals);
    const s = m.settings();
    if (p.flag('json')) ctx.out(jsonText({ machine: s.name, ...report }));
    else if (report.loops.length === 0) ctx.out(`${s.name}: no loops yet; add one with 'loopledger loop add AXIS/LOOP --plant EXPR'`);
    else {
      const c = report.counts;
      const counts = (['pass', 'fail', 'unstable', 'error'] as const).filter((k) => c[k] > 0).map((k) => `${c[k]} ${k}`);
      ctx.out([`${s.name}: ${report.loops.length} loop${report.loops.length === 1 ? '' : 's'}, ${counts.join(', ')}`, ...resultRows(report.loops, s.unit)].join('\n'));
    }
    return report.status === 'pass' ? 0 : 1;
  });
}
