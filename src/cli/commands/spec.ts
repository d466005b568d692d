import { REQUIREMENT_SYNTAX_HELP } from '../../engine/requirement-syntax.js';
import { UserError } from '../../model/errors.js';
import { BASE, changeOptions, JSON_OPT, NOTE, parseCommand, type CommandSpec } from '../args.js';
import type { CommandContext } from '../context.js';
import { runChange } from '../store.js';

const SPEC: CommandSpec = {
  name: 'spec',
  usage: [
    'usage: loopledger spec AXIS/LOOP REQ... [-m NOTE] [--author NAME] [--base REV [--force]] [--json]',
    '       loopledger spec AXIS/LOOP --drop KEY [-m NOTE] ...',
    '',
    'Adds requirements to a loop; one with the same metric and direction replaces the old one.',
    'e.g. loopledger spec X/pos pm>=60 gm>=10dB bw>=8Hz eramp<=0.025 os<=5%',
    REQUIREMENT_SYNTAX_HELP,
    '  --drop KEY   removes requirements: pm drops every pm limit, fc<= only the upper one,',
    '               eramp the kv limit it set (estep: kp, eparab: ka)',
  ].join('\n'),
  options: { drop: { type: 'string' }, ...NOTE, ...BASE, ...JSON_OPT },
  positionals: { min: 1, max: Infinity, what: 'the loop name AXIS/LOOP' },
};

/** `spec`: add, replace or drop requirements of a loop. */
export async function run(args: string[], ctx: CommandContext): Promise<number> {
  const p = parseCommand(args, SPEC, ctx);
  if (p === null) return 0;
  const [ref, ...reqs] = p.positionals as [string, ...string[]];
  const drop = p.str('drop');
  if (drop !== undefined && reqs.length > 0) throw new UserError('spec: give either requirements or --drop KEY, not both');
  if (drop === undefined && reqs.length === 0) throw new UserError(`spec: give at least one requirement, e.g. loopledger spec ${ref} pm>=45 gm>=6dB`);
  const opts = changeOptions(p);
  return runChange(ctx, p, opts.author, (m) => (drop !== undefined ? m.dropRequirements(ref, drop, opts) : m.setRequirements(ref, reqs, opts)));
}
