import { parseArgs } from 'node:util';
import { UserError } from '../../model/errors.js';
import type { CommandContext } from '../context.js';

const HELP = `usage: loopledger [--store PATH] [--no-color] [dash] [--poll MS]

The dashboard: every loop of the machine, live. Opens on the overview; press ?
for every key, q to quit. When stdout or stdin is not a terminal (a pipe, CI)
it prints the overview once as plain text and exits 0.

  --poll MS   how often to look for changes by other processes (default 1000)`;

/** Width for the plain snapshot: the terminal's if there is one, else $COLUMNS, else 100. */
function plainWidth(): number {
  const fromEnv = Number(process.env.COLUMNS);
  return process.stdout.columns ?? (Number.isFinite(fromEnv) && fromEnv >= 40 ? fromEnv : 100);
}

/**
 * `loopledger dash` (and `loopledger` with no command). ink and react are
 * imported only on the interactive path: a piped snapshot never pays for them
 * and never touches raw mode.
 */
export async function run(args: string[], ctx: CommandContext): Promise<number> {
  let values;
  try {
    ({ values } = parseArgs({ args, options: { poll: { type: 'string' }, help: { type: 'boolean', short: 'h' } }, allowPositionals: false }));
  } catch (e) {
    throw new UserError(`dash: ${(e as Error).message}; run 'loopledger dash --help'`);
  }
  if (values.help) {
    ctx.out(HELP);
    return 0;
  }
  const pollMs = values.poll === undefined ? 1000 : Number(values.poll);
  if (!Number.isFinite(pollMs) || pollMs < 100) throw new UserError(`dash: --poll '${values.poll}' must be a number of milliseconds, at least 100`);

  const { openEngineSource } = await import('../../tui/engine-source.js');
  const source = openEngineSource(ctx.storePath);
  try {
    if (!ctx.interactive) {
      const { overviewPlain } = await import('../../tui/overview-lines.js');
      ctx.out(overviewPlain(await source.overview(), plainWidth(), Date.now()).join('\n'));
      return 0;
    }
    const { runApp } = await import('../../tui/run-app.js');
    await runApp(source, { colour: !ctx.noColor, pollMs });
    return 0;
  } finally {
    source.close();
  }
}
