#!/usr/bin/env node
// Tiny bootstrap: colour must be decided before ink/chalk load, and chalk ignores
// NO_COLOR on its own, so we translate NO_COLOR and --no-color into FORCE_COLOR=0.
if (process.env.NO_COLOR !== undefined && process.env.NO_COLOR !== '' || process.argv.includes('--no-color')) {
  process.env.FORCE_COLOR = '0';
}
const { main } = await import('../dist/main.js');
process.exitCode = await main(process.argv.slice(2));
