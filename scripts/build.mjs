// Bundles the CLI into dist/ so a cold start does not pay for module resolution
// of hundreds of files (see shared notes on start-up cost). mathjs and ink stay
// in their own chunks, loaded only by the commands that need them.
import { rmSync } from 'node:fs';
import { build } from 'esbuild';

// `--outdir DIR` builds elsewhere (tests build their own copy, so they never race over dist/).
const at = process.argv.indexOf('--outdir');
const outdir = at > 0 && process.argv[at + 1] ? process.argv[at + 1] : 'dist';

// Chunk names carry content hashes: clear old ones so the output holds only this build.
rmSync(outdir, { recursive: true, force: true });

await build({
  // The recheck worker (src/engine/pool-setup.ts looks for it beside the chunk that starts it).
  entryPoints: { main: 'src/cli/main.ts', worker: 'src/engine/worker.ts' },
  outdir,
  bundle: true,
  splitting: true,
  format: 'esm',
  platform: 'node',
  target: 'node20',
  // ink imports react-devtools-core only when DEV=true (an optional dev tool, not installed):
  // leave it to runtime, where ink explains how to install it if someone asks for it.
  external: ['better-sqlite3', 'react-devtools-core'],
  // Some CommonJS dependencies call require(); give the ESM bundle one.
  banner: { js: "import { createRequire as __llCreateRequire } from 'node:module'; const require = __llCreateRequire(import.meta.url);" },
  logLevel: 'warning',
  define: { 'process.env.NODE_ENV': '"production"' },
});
