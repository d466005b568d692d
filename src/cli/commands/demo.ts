import { DEMO_STORE, ensureDemo } from '../../engine/demo.js';
import { parseCommand, type CommandSpec } from '../args.js';
import type { CommandContext } from '../context.js';
import { requireDirectory } from '../store.js';
import { run as check } from './check.js';

const SPEC: CommandSpec = {
  name: 'demo',
  usage: [
    'usage: loopledger demo [--store PATH] [--open]',
    '',
    `Creates the demo machine in ./${DEMO_STORE} (or PATH), or reuses the store that is already there:`,
    'a glass edge-finishing cell with five axes and twelve loops, several revisions each, some failing.',
    '  --open   show the overview right away',
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
  const store = /^[\w./-]+$/.test(path) ? path : `'${path.replace(/'/g, `'\\''`)}'`;
  ctx.out(['next, for example:', ...['check', 'loop show Z/vel', 'log Y/vel', 'diff R/vel 3 5'].map((c) => `  loopledger --store ${store} ${c}`)].join('\n'));
  if (p.flag('open')) {
    ctx.out('');
    // The overview's own exit status says "some loops fail"; for the demo that is the point, not an error.
    await check([], { ...ctx, storePath: path });
  }
  return 0;
}
