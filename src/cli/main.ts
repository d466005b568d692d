import { UserError } from '../model/errors.js';
import type { CommandContext, CommandModule } from './context.js';

interface CommandEntry {
  readonly summary: string;
  readonly load: () => Promise<CommandModule>;
}

/**
 * The command table. Each command lives in its own file and is loaded only when
 * used, so `check` never pays for mathjs and nothing but the dashboard loads ink.
 * Add one line per command; keep the list in the order `help` should show it.
 */
const COMMANDS: Record<string, CommandEntry> = {
  calc: { summary: 'analyse one loop from expressions, no store', load: () => import('./commands/calc.js') },
};

const USAGE_HEAD = 'usage: loopledger [--store PATH] [--no-color] COMMAND [ARGS]';

/** Prints the command list. */
function helpText(): string {
  const width = Math.max(...Object.keys(COMMANDS).map((k) => k.length));
  const rows = Object.entries(COMMANDS).map(([name, c]) => `  ${name.padEnd(width)}  ${c.summary}`);
  return [USAGE_HEAD, '', 'commands:', ...rows, '', 'Run `loopledger COMMAND --help` for the options of one command.'].join('\n');
}

/** Splits the global options (before the command word) from the command and its arguments. */
function splitGlobal(argv: string[]): { store: string | null; noColor: boolean; rest: string[] } {
  let store: string | null = null;
  let noColor = false;
  const rest: string[] = [];
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i]!;
    if (a === '--store') {
      const v = argv[i + 1];
      if (v === undefined) throw new UserError('--store needs a path, e.g. --store lab.loopledger.db');
      store = v;
      i++;
    } else if (a.startsWith('--store=')) store = a.slice('--store='.length);
    else if (a === '--no-color') noColor = true;
    else rest.push(a);
  }
  return { store, noColor, rest };
}

/** Entry point: returns the process exit status. */
export async function main(argv: string[]): Promise<number> {
  const err = (t: string) => process.stderr.write(t.endsWith('\n') ? t : t + '\n');
  try {
    const g = splitGlobal(argv);
    const envStore = process.env.LOOPLEDGER_STORE;
    const ctx: CommandContext = {
      storePath: g.store ?? (envStore && envStore !== '' ? envStore : './loopledger.db'),
      storeGiven: g.store !== null || (envStore !== undefined && envStore !== ''),
      out: (t: string) => process.stdout.write(t.endsWith('\n') ? t : t + '\n'),
      err,
      interactive: Boolean(process.stdin.isTTY && process.stdout.isTTY),
      noColor: g.noColor || (process.env.NO_COLOR !== undefined && process.env.NO_COLOR !== ''),
    };
    const [word, ...args] = g.rest;
    if (word === undefined) {
      const dash = COMMANDS['dash'];
      if (dash) return await (await dash.load()).run([], ctx);
      ctx.out(helpText());
      return 0;
    }
    if (word === 'help' || word === '--help' || word === '-h') {
      ctx.out(helpText());
      return 0;
    }
    const entry = COMMANDS[word];
    if (!entry) throw new UserError(`unknown command '${word}'; run 'loopledger help' for the list`);
    return await (await entry.load()).run(args, ctx);
  } catch (e) {
    if (e instanceof UserError) {
      err(`loopledger: ${e.message}`);
      return e.exitCode;
    }
    err(`loopledger: internal error: ${e instanceof Error ? (e.stack ?? e.message) : String(e)}`);
    return 3;
  }
}
