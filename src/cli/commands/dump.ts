import fs from 'node:fs';
import { UserError } from '../../model/errors.js';
import { parseCommand, type CommandSpec } from '../args.js';
import type { CommandContext } from '../context.js';
import { withMachine } from '../store.js';

const SPEC: CommandSpec = {
  name: 'dump',
  usage: [
    'usage: loopledger dump [-o FILE]',
    '',
    'Writes the whole machine with its full history as stable, sorted JSON (to stdout, or to FILE),',
    "so it can live in version control. 'loopledger load FILE' rebuilds the store from it.",
  ].join('\n'),
  options: { output: { type: 'string', short: 'o' } },
  positionals: { min: 0, max: 0, what: '' },
};

/** `dump`: the machine as JSON text. */
export async function run(args: string[], ctx: CommandContext): Promise<number> {
  const p = parseCommand(args, SPEC, ctx);
  if (p === null) return 0;
  const file = p.str('output');
  const text = await withMachine(ctx, undefined, (m) => m.dump());
  if (file === undefined) {
    ctx.out(text);
    return 0;
  }
  // Write beside the target and rename, so a failed write never leaves half a dump behind.
  const tmp = `${file}.tmp-${process.pid}`;
  try {
    fs.writeFileSync(tmp, text.endsWith('\n') ? text : text + '\n');
    fs.renameSync(tmp, file);
  } catch (e) {
    fs.rmSync(tmp, { force: true });
    throw new UserError(`dump: cannot write ${file} (${(e as NodeJS.ErrnoException).code ?? String(e)}); check the path and permissions`);
  }
  ctx.out(`dump written to ${file}`);
  return 0;
}
