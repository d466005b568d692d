import path from 'node:path';
import { initMachine } from '../../engine/index.js';
import { UserError } from '../../model/errors.js';
import { JSON_OPT, parseCommand, type CommandSpec } from '../args.js';
import type { CommandContext } from '../context.js';
import { jsonText } from '../output.js';
import { requireDirectory } from '../store.js';

const SPEC: CommandSpec = {
  name: 'init',
  usage: [
    'usage: loopledger [--store PATH] init [--name NAME] [--units hz|rad] [--json]',
    '',
    'Creates a new machine store (default ./loopledger.db).',
    '  --name NAME     the machine\'s name (default: the file name)',
    '  --units hz|rad  how frequencies are shown and read when typed without a unit (default hz)',
  ].join('\n'),
  options: { name: { type: 'string' }, units: { type: 'string' }, ...JSON_OPT },
  positionals: { min: 0, max: 0, what: '' },
};

/** `init`: a new store with its machine settings. */
export async function run(args: string[], ctx: CommandContext): Promise<number> {
  const p = parseCommand(args, SPEC, ctx);
  if (p === null) return 0;
  const units = (p.str('units') ?? 'hz').toLowerCase();
  if (units !== 'hz' && units !== 'rad') throw new UserError(`init: --units '${units}' is not known; use hz or rad`);
  const name = p.str('name') ?? path.basename(ctx.storePath).replace(/(\.loopledger)?\.db$/i, '');
  requireDirectory(ctx.storePath);
  const m = initMachine(ctx.storePath, { name, unit: units });
  try {
    const s = m.settings();
    if (p.flag('json')) ctx.out(jsonText({ path: m.path, ...s }));
    else {
      ctx.out(`created ${m.path}: machine '${s.name}', frequencies in ${s.unit === 'hz' ? 'Hz' : 'rad/s'}`);
      ctx.out(`next: loopledger axis add X -m "what the axis is"`);
    }
  } finally {
    m.close();
  }
  return 0;
}
