import type { TransferFunction } from './tf.js';

/**
 * One block of a compensator. Frequencies are rad/s. Every block except `gain`
 * and `expr` has unity gain at the frequency where that is natural (DC for lead,
 * lag, low-pass and notch; the integrating blocks carry their own scale), so the
 * compensator's overall gain lives in one place: a `gain` block.
 */
export type Block =
  /** k */
  | { readonly kind: 'gain'; readonly k: number }
  /** 1/s */
  | { readonly kind: 'integrator' }
  /** (s + zeroRadS)/s : PI with its zero at zeroRadS, unity high-frequency gain. */
  | { readonly kind: 'pi'; readonly zeroRadS: number }
  /** (s/zeroRadS + 1)/(s/poleRadS + 1) with zeroRadS < poleRadS: phase lead, unity DC gain. */
  | { readonly kind: 'lead'; readonly zeroRadS: number; readonly poleRadS: number }
  /** (s/zeroRadS + 1)/(s/poleRadS + 1) with poleRadS < zeroRadS: phase lag, unity DC gain. */
  | { readonly kind: 'lag'; readonly zeroRadS: number; readonly poleRadS: number }
  /** kp + ki/s + kd s/(s/filterRadS + 1): parallel PID with a first-order derivative filter. */
  | { readonly kind: 'pid'; readonly kp: number; readonly ki: number; readonly kd: number; readonly filterRadS: number }
  /**
   * (s^2 + 2 zz w s + w^2)/(s^2 + 2 zp w s + w^2), w = centerRadS, zp = 1/(2 q),
   * zz = zp * 10^(-depthDb/20): unity gain far from w, -depthDb at w.
   */
  | { readonly kind: 'notch'; readonly centerRadS: number; readonly depthDb: number; readonly q: number }
  /** 1/(s/cornerRadS + 1) */
  | { readonly kind: 'lowpass1'; readonly cornerRadS: number }
  /** w^2/(s^2 + 2 zeta w s + w^2), w = cornerRadS */
  | { readonly kind: 'lowpass2'; readonly cornerRadS: number; readonly zeta: number }
  /** A generic rational block, written as an expression in s; `tf` is its parsed form. */
  | { readonly kind: 'expr'; readonly text: string; readonly tf: TransferFunction };

export type BlockKind = Block['kind'];

/** The controller of a loop: blocks in series, in order. */
export interface Compensator {
  readonly blocks: readonly Block[];
  /** True when the user accepts an improper compensator (e.g. ideal PID); time metrics then say they need a proper loop. */
  readonly ideal?: boolean;
}
