import { BASE, changeOptions, dispatch, JSON_OPT, NOTE, parseCommand, type CommandSpec } from '../args.js';
import type { CommandContext } from '../context.js';
import { runChange } from '../store.js';

const SET: CommandSpec = {
  name: 'plant set',
  usage: [
    'usage: loopledger plant set AXIS/LOOP EXPR [--variant NAME] [-m NOTE] [--author NAME] [--base REV [--force]] [--json]',
    '',
    'Sets (adds or replaces) one plant variant of a loop from an expression in s, e.g. "0.64/(4.7e-4*s+2e-4)*exp(-1.9e-4*s)".',
    'Requirements must hold for every variant. Without --variant the variant is nominal.',
    '  --base REV   the revision you based this change on; refused if the loop moved on since, unless --force',
  ].join('\n'),
  options: { variant: { type: 'string' }, ...NOTE, ...BASE, ...JSON_OPT },
  positionals: { min: 2, max: 2, what: 'AXIS/LOOP and the plant EXPR' },
};

const DROP: CommandSpec = {
  name: 'plant drop',
  usage: 'usage: loopledger plant drop AXIS/LOOP VARIANT [-m NOTE] [--author NAME] [--base REV [--force]] [--json]\n\nRemoves one plant variant (a loop keeps at least one).',
  options: { ...NOTE, ...BASE, ...JSON_OPT },
  positionals: { min: 2, max: 2, what: 'AXIS/LOOP and the VARIANT to drop' },
};

const USAGE = 'usage: loopledger plant set AXIS/LOOP EXPR [--variant NAME] [-m NOTE] | loopledger plant drop AXIS/LOOP VARIANT [-m NOTE]';

/** `plant set` and `plant drop`. */
export async function run(args: string[], ctx: CommandContext): Promise<number> {
  return dispatch(args, ctx, 'plant', USAGE, { set: (r) => change('set', r, ctx), drop: (r) => change('drop', r, ctx) });
}

async function change(sub: 'set' | 'drop', args: string[], ctx: CommandContext): Promise<number> {
  const p = parseCommand(args, sub === 'set' ? SET : DROP, ctx);
  if (p === null) return 0;
  const [ref, arg] = [p.positionals[0]!, p.positionals[1]!];
  const opts = changeOptions(p);
  const variant = p.str('variant');
  return runChange(ctx, p, opts.author, (m) =>
    sub === 'set' ? m.setPlant(ref, arg, { ...opts, ...(variant === undefined ? {} : { variant }) }) : m.dropPlant(ref, arg, opts));
}
