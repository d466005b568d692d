import { dispatch, JSON_OPT, NOTE, parseCommand, type CommandSpec } from '../args.js';
import type { CommandContext } from '../context.js';
import { jsonText, table } from '../output.js';
import { withMachine } from '../store.js';

const ADD: CommandSpec = {
  name: 'axis add',
  usage: 'usage: loopledger axis add NAME [-m NOTE] [--author NAME] [--json]\n\nAdds an axis (a mechanical degree of freedom: X, Y, a spindle ...).',
  options: { ...NOTE, ...JSON_OPT },
  positionals: { min: 1, max: 1, what: 'the axis NAME' },
};

const LIST: CommandSpec = {
  name: 'axis list',
  usage: 'usage: loopledger axis list [--json]\n\nLists the axes with their loops.',
  options: { ...JSON_OPT },
  positionals: { min: 0, max: 0, what: '' },
};

const USAGE = 'usage: loopledger axis add NAME [-m NOTE] | loopledger axis list [--json]';

/** `axis add` and `axis list`. */
export async function run(args: string[], ctx: CommandContext): Promise<number> {
  return dispatch(args, ctx, 'axis', USAGE, { add: (r) => add(r, ctx), list: (r) => list(r, ctx) });
}

async function add(args: string[], ctx: CommandContext): Promise<number> {
  const p = parseCommand(args, ADD, ctx);
  if (p === null) return 0;
  const note = p.str('message');
  const a = await withMachine(ctx, p.str('author'), (m) => m.addAxis(p.positionals[0]!, note === undefined ? {} : { note }));
  ctx.out(p.flag('json') ? jsonText(a) : `axis ${a.name} added`);
  return 0;
}

async function list(args: string[], ctx: CommandContext): Promise<number> {
  const p = parseCommand(args, LIST, ctx);
  if (p === null) return 0;
  const axes = await withMachine(ctx, undefined, (m) => m.listAxes());
  if (p.flag('json')) ctx.out(jsonText(axes));
  else if (axes.length === 0) ctx.out("no axes yet; add one with 'loopledger axis add NAME'");
  else ctx.out(table([['axis', 'loops', 'note'], ...axes.map((a) => [a.name, a.loops.map((l) => l.split('/')[1]).join(' ') || '-', a.note])]).join('\n'));
  return 0;
}
