import type { Block } from '../model/blocks.js';

/**
 * The first-order lead (s/z + 1)/(s/p + 1) with alpha = z/p < 1 (the textbook
 * form (Ts + 1)/(alpha T s + 1), z = 1/T, p = 1/(alpha T)): its largest phase
 * phi_m satisfies sin(phi_m) = (1 - alpha)/(1 + alpha) and occurs at
 * w_m = sqrt(z p), where its gain is 1/sqrt(alpha).
 */

const DEG = Math.PI / 180;

/** alpha of a lead whose largest phase is phiDeg: (1 - sin phi)/(1 + sin phi). */
export function leadAlphaForPhase(phiDeg: number): number {
  const s = Math.sin(phiDeg * DEG);
  return (1 - s) / (1 + s);
}

/** Largest phase of a lead with ratio alpha (deg). */
export function leadMaxPhaseDeg(alpha: number): number {
  return Math.asin((1 - alpha) / (1 + alpha)) / DEG;
}

/** A lead block whose largest phase, for ratio alpha, sits at wmRadS. */
export function leadCentredAt(wmRadS: number, alpha: number): Block {
  const r = Math.sqrt(alpha);
  return { kind: 'lead', zeroRadS: wmRadS * r, poleRadS: wmRadS / r };
}

/** n identical leads centred at wmRadS. */
export function leadStages(wmRadS: number, alpha: number, n: number): Block[] {
  return Array.from({ length: n }, () => leadCentredAt(wmRadS, alpha));
}
