import { DEMO_STORE, ensureDemo } from '../../engine/demo.js';
import { parseCommand, type CommandSpec } from '../args.js';
import type { CommandContext } from '../context.js';
import { requireDirectory } from '../store.js';
import { run as dash } from './dash.js';

const SPEC: CommandSpec = {
  name: 'demo',
  usage: [
    'usage: loopledger demo [--store PATH] [--open]',
    '',
    `Creates the demo machine in ./${DEMO_STORE} (or PATH), or reuses the store that is already there:`,
    'a glass edge-finishing cell with five axes and twelve loops, several revisions each, some failing.',
    '  --open   open the dashboard on it right away (a plain overview when not in a terminal)',
  ].join('\n'),
  options: { open: { type: 'boolean' } },
  positionals: { min: 0, max: 0, what: '' },
};

/** `demo`: build or reuse the demo store and say what to try next. */
export async function run(args: string[], ctx: CommandContext): Promise<number> {
  const p = parseCommand(args, SPEC, ctx);
  if (p === null) return 0;
  const path = ctx.storeGiven ? ctx.storePath : DEMO_STORE;
  requireDirectory(path);
  const { machine: m, created } = await ensureDemo(path);
  try {
    const s = m.settings();
    const loops = m.listLoops();
    const revisions = loops.reduce((n, l) => n + l.head.number, 0);
    const what = `machine '${s.name}', ${m.listAxes().length} axes, ${loops.length} loops, ${revisions} revisions`;
    ctx.out(created ? `created ${path}: ${what}` : `using the existing store ${path}: ${what}`);
  } finally {
    m.close();
  }
  if (p.flag('open')) {
    // In a terminal this is the dashboard; piped, the dashboard prints the overview once and exits 0.
    return dash([], { ...ctx, storePath: path });
  }
  const store = /^[\w./-]+$/.test(path) ? path : `'${path.replace(/'/g, `'\\''`)}'`;
  ctx.out(['next, for example:', ...['', 'check', 'loop show Z/vel', 'log Y/vel', 'tune Z/vel lead'].map((c) => `  loopledger --store ${store} ${c}`.trimEnd())].join('\n'));
  return 0;
}
