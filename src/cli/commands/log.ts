import { JSON_OPT, parseCommand, type CommandSpec } from '../args.js';
import type { CommandContext } from '../context.js';
import { jsonText, shortTime, statusText, table } from '../output.js';
import { withMachine } from '../store.js';

const SPEC: CommandSpec = {
  name: 'log',
  usage: [
    'usage: loopledger log AXIS/LOOP [--json]',
    '',
    'Every revision of a loop, oldest first: number, time (UTC), author, the status it was checked',
    'with when it was saved (- where none was stored, e.g. older revisions of a loaded dump), what',
    'changed, and the note.',
  ].join('\n'),
  options: { ...JSON_OPT },
  positionals: { min: 1, max: 1, what: 'the loop name AXIS/LOOP' },
};

/** Widest change text shown; the full text is in --json and in 'loop show'. */
const CHANGE_WIDTH = 72;

/** Cuts a text to `width` characters, marking the cut with '...'. */
function clip(text: string, width: number): string {
  return text.length <= width ? text : text.slice(0, width - 3) + '...';
}

/** `log`: a loop's history. Reads the store only (no analysis, no expression parser). */
export async function run(args: string[], ctx: CommandContext): Promise<number> {
  const p = parseCommand(args, SPEC, ctx);
  if (p === null) return 0;
  return withMachine(ctx, undefined, (m) => {
    const revs = m.log(p.positionals[0]!);
    if (p.flag('json')) ctx.out(jsonText(revs));
    else {
      const rows = revs.map((r) => [String(r.number), shortTime(r.time), r.author, r.status === null ? '-' : statusText(r.status), clip(r.summary, CHANGE_WIDTH)]);
      const [head, ...lines] = table([['rev', 'time (UTC)', 'by', 'status then', 'change'], ...rows], [0]);
      // The note goes on its own line under its revision, so long notes never push the table apart.
      ctx.out([head!, ...lines.flatMap((l, i) => (revs[i]!.note === '' ? [l] : [l, `     "${revs[i]!.note}"`]))].join('\n'));
    }
    return 0;
  });
}
