import { BLOCK_SYNTAX_HELP } from '../../engine/block-syntax.js';
import { BASE, changeOptions, dispatch, JSON_OPT, NOTE, parseCommand, type CommandSpec } from '../args.js';
import type { CommandContext } from '../context.js';
import { runChange } from '../store.js';

const SET: CommandSpec = {
  name: 'comp set',
  usage: [
    'usage: loopledger comp set AXIS/LOOP BLOCK... [-m NOTE] [--author NAME] [--base REV [--force]] [--ideal] [--json]',
    '',
    'Replaces the compensator of a loop by the given blocks in series, in order.',
    'e.g. loopledger comp set X/vel gain:0.4 pi:5Hz notch:140Hz,depth=40dB,q=0.7 lp1:500Hz',
    BLOCK_SYNTAX_HELP,
    'Bare frequencies are in the store\'s unit; Hz, kHz and rad/s suffixes are accepted.',
    '  --base REV   the revision you based this change on; refused if the loop moved on since, unless --force',
    '  --ideal      accept an improper compensator (e.g. a PID without derivative filter)',
  ].join('\n'),
  options: { ideal: { type: 'boolean' }, ...NOTE, ...BASE, ...JSON_OPT },
  positionals: { min: 2, max: Infinity, what: 'AXIS/LOOP and at least one BLOCK' },
};

const USAGE = 'usage: loopledger comp set AXIS/LOOP BLOCK... [-m NOTE] [--base REV [--force]]';

/** `comp set`. */
export async function run(args: string[], ctx: CommandContext): Promise<number> {
  return dispatch(args, ctx, 'comp', USAGE, { set: (r) => set(r, ctx) });
}

async function set(args: string[], ctx: CommandContext): Promise<number> {
  const p = parseCommand(args, SET, ctx);
  if (p === null) return 0;
  const [ref, ...blocks] = p.positionals as [string, ...string[]];
  const opts = changeOptions(p);
  return runChange(ctx, p, opts.author, (m) => m.setCompensator(ref, blocks, { ...opts, ...(p.flag('ideal') ? { ideal: true } : {}) }));
}
