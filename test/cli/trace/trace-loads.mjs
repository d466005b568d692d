// Preloaded with `node --import` by process.test.ts: records every module the
// process loads (ESM by URL through a load hook, CommonJS by request) into the
// file named by LOOPLEDGER_TRACE, so a test can say what a command pulled in.
import fs from 'node:fs';
import Module, { register } from 'node:module';

const out = process.env.LOOPLEDGER_TRACE;
if (out) {
  const load = Module._load;
  Module._load = function (request, ...rest) {
    fs.appendFileSync(out, `cjs ${request}\n`);
    return load.call(this, request, ...rest);
  };
  register('./trace-hooks.mjs', import.meta.url, { data: { out } });
}
