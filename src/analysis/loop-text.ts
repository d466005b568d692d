import type { LoopMetrics } from '../model/metrics.js';
import { analyseLoop, type AnalyseOptions } from './loop.js';
import { parseTransferFunction } from './parse.js';

/**
 * Loop analysis straight from expression text. Kept apart from loop.ts so that code
 * analysing stored coefficients never loads the expression parser.
 */

/** Parses both expressions (the plant must be proper) and analyses the loop; throws ExpressionError/UserError on bad input. */
export function analyseExpressions(plantText: string, compText: string, opts: AnalyseOptions = {}): LoopMetrics {
  const plant = parseTransferFunction(plantText, 'plant');
  const comp = parseTransferFunction(compText, 'compensator');
  return analyseLoop(plant, comp, opts);
}
