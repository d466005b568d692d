import { benchCalc } from './calc-bench.js';
import { benchStore } from './store-bench.js';

// `npm run bench`: each part returns its lines; timings are printed, never asserted.
for (const part of [benchCalc, benchStore]) {
  for (const line of await part()) console.log(line);
}
