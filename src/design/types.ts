import type { Factored } from '../analysis/factors.js';
import type { Block } from '../model/blocks.js';
import type { TransferFunction } from '../model/tf.js';
import type { WorksheetStep } from './worksheet.js';

/** One plant variant as a design sees it: the plant times the compensator blocks that are kept. */
export interface DesignVariant {
  readonly name: string;
  /** Plant × kept blocks, polynomial form (error constants are read off it exactly). */
  readonly tf: TransferFunction;
  /** The same in factored form (Bode magnitude and continuous phase). */
  readonly shape: Factored;
  /** The plant alone, factored (its poles are where resonances are looked for). */
  readonly plant: Factored;
}

/** A candidate set of designed blocks and the phase margin it gives the worst variant. */
export interface Candidate {
  readonly blocks: readonly Block[];
  /** Smallest |PM| over every crossover of every variant (deg); Infinity without a crossover. */
  readonly worstPmDeg: number;
}

/** What one design procedure returns before verification. */
export interface DesignOutcome {
  /** The designed blocks (gain first); kept blocks are added by the caller. */
  readonly blocks: readonly Block[];
  /** The hand procedure's result, when the method has one. */
  readonly hand: Candidate | null;
  /** The numerically refined result, when the method refines. */
  readonly refined: Candidate | null;
  readonly worksheet: readonly WorksheetStep[];
  /** False when the procedure could not reach its target (the message says what is achievable). */
  readonly feasible: boolean;
  readonly message: string;
}

/** A procedure that stopped: no blocks, the worksheet so far, and the reason. */
export function failedOutcome(worksheet: readonly WorksheetStep[], reason: string): DesignOutcome {
  return { blocks: [], hand: null, refined: null, worksheet, feasible: false, message: reason };
}
