import fs from 'node:fs';
import path from 'node:path';
import { openMachine, type ChangeOutcome, type Machine } from '../engine/index.js';
import { UserError } from '../model/errors.js';
import type { Parsed } from './args.js';
import type { CommandContext } from './context.js';
import { jsonText } from './output.js';
import { outcomeLines } from './present.js';

/**
 * Opens the store a command works on (ctx.storePath), runs `fn`, and closes the
 * store whatever happens. `author` is the --author option, used for every change.
 */
export async function withMachine<T>(ctx: CommandContext, author: string | undefined, fn: (m: Machine) => Promise<T> | T): Promise<T> {
  const m = openMachine(ctx.storePath, author === undefined ? {} : { author });
  try {
    return await fn(m);
  } finally {
    m.close();
  }
}

/** Runs one change and prints its outcome (JSON with --json, else the new revision and the rechecked loops). */
export async function runChange(ctx: CommandContext, p: Parsed, author: string | undefined, change: (m: Machine) => Promise<ChangeOutcome>): Promise<number> {
  return withMachine(ctx, author, async (m) => {
    const o = await change(m);
    ctx.out(p.flag('json') ? jsonText(o) : outcomeLines(o, m.settings().unit).join('\n'));
    return 0;
  });
}

/** Refuses a new store whose directory does not exist (before anything tries to create the file). */
export function requireDirectory(file: string): void {
  const dir = path.dirname(path.resolve(file));
  if (!fs.existsSync(dir)) throw new UserError(`cannot create ${file}: the directory ${dir} does not exist; create it first or choose another --store`);
}
