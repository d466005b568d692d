import { parseArgs } from 'node:util';
import { UserError } from '../model/errors.js';
import type { CommandContext } from './context.js';

/** An option of one command, as node:util parseArgs takes it. */
export interface OptionSpec {
  readonly type: 'string' | 'boolean';
  readonly short?: string;
  readonly multiple?: boolean;
}

/** What a command accepts: its usage text (first line is the synopsis), options and positional count. */
export interface CommandSpec {
  /** e.g. 'loop add'; used in messages. */
  readonly name: string;
  readonly usage: string;
  readonly options?: Readonly<Record<string, OptionSpec>>;
  readonly positionals: { readonly min: number; readonly max: number; readonly what: string };
}

export type OptionValues = Readonly<Record<string, string | boolean | string[] | undefined>>;

/** Parsed arguments with small typed accessors. */
export interface Parsed {
  readonly values: OptionValues;
  readonly positionals: readonly string[];
  str(name: string): string | undefined;
  flag(name: string): boolean;
}

/** Options most commands share. */
export const NOTE: Record<string, OptionSpec> = { message: { type: 'string', short: 'm' }, author: { type: 'string' } };
export const JSON_OPT: Record<string, OptionSpec> = { json: { type: 'boolean' } };
export const BASE: Record<string, OptionSpec> = { base: { type: 'string' }, force: { type: 'boolean' } };

/**
 * Parses a command's arguments with node:util parseArgs. Returns null after
 * printing the usage when --help (or -h) is given. Every mistake becomes one
 * UserError line that names the command and points at its --help.
 */
export function parseCommand(args: readonly string[], spec: CommandSpec, ctx: CommandContext): Parsed | null {
  if (args.includes('--help') || args.includes('-h')) {
    ctx.out(spec.usage);
    return null;
  }
  const hint = `see 'loopledger ${spec.name} --help'`;
  let parsed: { values: Record<string, unknown>; positionals: string[] };
  try {
    parsed = parseArgs({ args: [...args], options: { ...(spec.options ?? {}) }, allowPositionals: true, strict: true });
  } catch (e) {
    throw new UserError(`${spec.name}: ${argError(e)}; ${hint}`);
  }
  const { min, max, what } = spec.positionals;
  const n = parsed.positionals.length;
  if (n < min) throw new UserError(`${spec.name}: missing ${what}; ${hint}`);
  if (n > max) throw new UserError(`${spec.name}: unexpected argument '${parsed.positionals[max]}'; ${hint}`);
  const values = parsed.values as OptionValues;
  return {
    values,
    positionals: parsed.positionals,
    str: (name) => {
      const v = values[name];
      if (v === undefined) return undefined;
      if (typeof v !== 'string') throw new Error(`option --${name} is not a string option`);
      return v;
    },
    flag: (name) => values[name] === true,
  };
}

/** node:util's parse errors in our own short words. */
export function argError(e: unknown): string {
  const code = (e as { code?: string }).code;
  const msg = e instanceof Error ? e.message : String(e);
  const opt = /'(-[^' ]+)/.exec(msg)?.[1] ?? '';
  if (/ambiguous/.test(msg)) return `the value of '${opt}' starts with '-': write it joined, e.g. ${opt}=-1`;
  switch (code) {
    case 'ERR_PARSE_ARGS_UNKNOWN_OPTION':
      // A negative number or expression looks like an option to the parser: say how to pass it.
      return /^-[\d.(s]/.test(opt) ? `'${opt}' reads as an option; put values that start with '-' after '--'` : `unknown option '${opt}'`;
    case 'ERR_PARSE_ARGS_INVALID_OPTION_VALUE':
      return /argument missing/.test(msg) ? `option '${opt}' needs a value` : `option '${opt}' takes no value`;
    default:
      return msg.split('\n')[0]!;
  }
}

/** A revision number as typed: a whole number from 1 up. */
export function parseRevision(text: string, what = 'revision'): number {
  if (!/^\d+$/.test(text.trim()) || Number(text) < 1) throw new UserError(`${what} '${text}' is not a revision number; revisions are 1, 2, 3 ... ('loopledger log' lists them)`);
  return Number(text);
}

/** The change options every writing command shares: note, author, base revision, force. */
export function changeOptions(p: Parsed): { note?: string; author?: string; base?: number; force?: boolean } {
  const out: { note?: string; author?: string; base?: number; force?: boolean } = {};
  const note = p.str('message');
  const author = p.str('author');
  const base = p.str('base');
  if (note !== undefined) out.note = note;
  if (author !== undefined) {
    if (author.trim() === '') throw new UserError('--author needs a name, e.g. --author ines');
    out.author = author;
  }
  if (base !== undefined) out.base = parseRevision(base, '--base');
  if (p.flag('force')) {
    if (base === undefined) throw new UserError('--force only makes sense with --base REV (a change without --base is always based on the latest revision)');
    out.force = true;
  }
  return out;
}

/** Runs the subcommand named by the first argument ('axis add', 'loop list' ...); bare or --help prints `usage`. */
export async function dispatch(
  args: readonly string[], ctx: CommandContext, name: string, usage: string,
  subs: Readonly<Record<string, (rest: string[]) => Promise<number>>>,
): Promise<number> {
  const [sub, ...rest] = args;
  if (sub === undefined || sub === '--help' || sub === '-h') {
    ctx.out(usage);
    return 0;
  }
  const run = Object.hasOwn(subs, sub) ? subs[sub] : undefined;
  if (run === undefined) throw new UserError(`${name}: unknown subcommand '${sub}'; ${usage}`);
  return run(rest);
}
