import fs from 'node:fs';
import { loadMachine } from '../../engine/index.js';
import { UserError } from '../../model/errors.js';
import { JSON_OPT, parseCommand, type CommandSpec } from '../args.js';
import type { CommandContext } from '../context.js';
import { jsonText } from '../output.js';
import { requireDirectory } from '../store.js';

const SPEC: CommandSpec = {
  name: 'load',
  usage: [
    'usage: loopledger [--store PATH] load FILE [--json]',
    '',
    "Builds a store from a dump written by 'loopledger dump': every axis, loop and revision as it was",
    '(authors, times and notes kept), then checks every loop. The store must be new or empty;',
    'on any problem nothing is written.',
  ].join('\n'),
  options: { ...JSON_OPT },
  positionals: { min: 1, max: 1, what: 'the dump FILE' },
};

/** `load`: a dump into a new or empty store. */
export async function run(args: string[], ctx: CommandContext): Promise<number> {
  const p = parseCommand(args, SPEC, ctx);
  if (p === null) return 0;
  const file = p.positionals[0]!;
  requireDirectory(ctx.storePath);
  let text: string;
  try {
    text = fs.readFileSync(file, 'utf8');
  } catch (e) {
    throw new UserError(`load: cannot read ${file} (${(e as NodeJS.ErrnoException).code ?? String(e)}); give the path of a file written by 'loopledger dump'`);
  }
  const existed = fs.existsSync(ctx.storePath);
  let m;
  try {
    m = await loadMachine(ctx.storePath, text);
  } catch (e) {
    // A refused load leaves no trace: not even the empty store file it would have filled.
    if (!existed) for (const f of [ctx.storePath, `${ctx.storePath}-wal`, `${ctx.storePath}-shm`]) fs.rmSync(f, { force: true });
    throw e;
  }
  try {
    const s = m.settings();
    const loops = m.listLoops().length;
    if (p.flag('json')) ctx.out(jsonText({ path: m.path, machine: s.name, axes: m.listAxes().length, loops }));
    else ctx.out(`loaded ${file} into ${m.path}: machine '${s.name}', ${m.listAxes().length} axes, ${loops} loops`);
  } finally {
    m.close();
  }
  return 0;
}
