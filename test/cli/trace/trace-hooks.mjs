// Module hooks (run off the main thread): log each ESM module URL as it loads.
import fs from 'node:fs';

let out = '';

export function initialize(data) {
  out = data.out;
}

export async function load(url, context, next) {
  fs.appendFileSync(out, `esm ${url}\n`);
  return next(url, context);
}
