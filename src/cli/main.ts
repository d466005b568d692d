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
  demo: { summary: 'create (or reuse) the demo machine in ./demo.loopledger.db', load: () => import('./commands/demo.js') },
  init: { summary: 'create a new machine store', load: () => import('./commands/init.js') },
  axis: { summary: 'axis add NAME | axis list', load: () => import('./commands/axis.js') },
  loop: { summary: 'loop add AXIS/LOOP --plant EXPR | loop list | loop show AXIS/LOOP', load: () => import('./commands/loop.js') },
  plant: { summary: 'plant set AXIS/LOOP EXPR [--variant NAME] | plant drop AXIS/LOOP VARIANT', load: () => import('./commands/plant.js') },
  spec: { summary: 'add, replace or drop requirements of a loop (pm>=45 gm>=6dB ...)', load: () => import('./commands/spec.js') },
  comp: { summary: 'comp set AXIS/LOOP BLOCK...: a new compensator (gain:2 lead:30Hz/150Hz ...)', load: () => import('./commands/comp.js') },
  tune: { summary: 'propose a compensator (lead, lag, leadlag, pid, notch, lowpass) with its worksheet; --apply saves it', load: () => import('./commands/tune.js') },
  check: { summary: 'check every requirement of every loop; exit 1 if any fails', load: () => import('./commands/check.js') },
  log: { summary: 'the revisions of a loop: who changed what, when and why', load: () => import('./commands/log.js') },
  diff: { summary: 'what changed between two revisions, and the metric deltas', load: () => import('./commands/diff.js') },
  export: { summary: 'discrete filter sections of a compensator for firmware (text, JSON or C)', load: () => import('./commands/export.js') },
  revert: { summary: 'a new revision equal to an old one', load: () => import('./commands/revert.js') },
  dump: { summary: 'the whole machine with its history as stable JSON', load: () => import('./commands/dump.js') },
  load: { summary: 'build a new store from a dump', load: () => import('./commands/load.js') },
  calc: { summary: 'analyse one loop from expressions, no store', load: () => import('./commands/calc.js') },
  dash: { summary: 'the dashboard: every loop at a glance, live (also: no command)', load: () => import('./commands/dash.js') },
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
    const entry = Object.hasOwn(COMMANDS, word) ? COMMANDS[word] : undefined;
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
