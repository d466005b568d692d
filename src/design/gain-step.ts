import { formatNumber } from '../model/units.js';
import { ERROR_CONSTANT_UNIT, gainForErrorConstants, type ErrorConstantTarget } from './targets.js';
import type { DesignVariant } from './types.js';
import type { Worksheet } from './worksheet.js';

/** The loop gain a frequency-response procedure starts from, or why there is none. */
export type GainStep = { readonly ok: true; readonly k: number } | { readonly ok: false; readonly reason: string };

/**
 * Step 1 of the Bode procedures: the gain that meets the error-constant targets on
 * the design variant (K = required constant / constant per unit gain). Without a
 * target the gain stays at fallbackK. Writes its numbers into the worksheet.
 */
export function gainFromTargets(v: DesignVariant, targets: readonly ErrorConstantTarget[], fallbackK: number, ws: Worksheet): GainStep {
  const g = gainForErrorConstants(v.tf, targets, fallbackK);
  if (!g.ok) return g;
  if (g.binding === null) {
    ws.add(targets.length === 0 ? 'no error-constant target: gain kept' : 'error constants met by the integrators: gain kept', g.k);
    return { ok: true, k: g.k };
  }
  const t = g.binding;
  const unit = ERROR_CONSTANT_UNIT[t.kind];
  ws.add(`required ${t.kind}`, t.value, unit);
  ws.add(`${t.kind} of plant and kept blocks per unit gain`, g.perUnitGain, unit);
  ws.add(`gain K = ${t.kind} / ${formatNumber(g.perUnitGain ?? NaN)}`, g.k);
  return { ok: true, k: g.k };
}

