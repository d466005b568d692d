import { UserError } from '../../model/errors.js';
import { BASE, changeOptions, JSON_OPT, NOTE, parseCommand, parseRevision, type CommandSpec } from '../args.js';
import type { CommandContext } from '../context.js';
import { runChange } from '../store.js';

const SPEC: CommandSpec = {
  name: 'revert',
  usage: [
    'usage: loopledger revert AXIS/LOOP REV -m NOTE [--author NAME] [--base REV [--force]] [--json]',
    '',
    'Saves a new revision whose plants, requirements and compensator equal those of revision REV.',
    'Nothing is deleted: the history keeps every revision. The note (why) is required.',
  ].join('\n'),
  options: { ...NOTE, ...BASE, ...JSON_OPT },
  positionals: { min: 2, max: 2, what: 'AXIS/LOOP and the revision REV to return to' },
};

/** `revert`: a new revision equal to an old one. */
export async function run(args: string[], ctx: CommandContext): Promise<number> {
  const p = parseCommand(args, SPEC, ctx);
  if (p === null) return 0;
  const [ref, rev] = [p.positionals[0]!, parseRevision(p.positionals[1]!)];
  const opts = changeOptions(p);
  if (opts.note === undefined || opts.note.trim() === '') throw new UserError(`revert: say why with -m NOTE, e.g. loopledger revert ${ref} ${rev} -m "back to the tune that ran on the machine"`);
  return runChange(ctx, p, opts.author, (m) => m.revert(ref, rev, opts));
}
