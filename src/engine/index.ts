import type { Block } from '../model/blocks.js';
import type { Requirement } from '../model/requirements.js';
import type { FreqUnit } from '../model/units.js';
import type {
  AxisInfo, BlockInput, ChangeOptions, ChangeOutcome, CheckReport, EffectivePlants, EffectivePlantsOptions, LoopDetail, LoopDiff, LoopEdit,
  LoopInfo, MachineSettings, OverviewRow, RequirementInput, Revision, RevisionInfo, WhatIfEdit, WhatIfResult,
} from './types.js';

export type * from './types.js';
export { ConflictError } from './errors.js';

/**
 * The engine: the one path for every change and every view of a machine store.
 * The command line and the dashboard both call this and nothing else below it.
 *
 * Loops are named "AXIS/LOOP". Every change (plant, requirements, compensator,
 * revert) writes one new revision and rechecks the loop and every outer loop
 * built on it, all in one IMMEDIATE transaction; a failed validation writes
 * nothing. Methods that may have to analyse a loop are async because the
 * numerics are loaded only when needed (a `check` of fresh results never loads
 * them). Bad input throws UserError (exit status 2); a stale `base` throws
 * ConflictError (a UserError) naming who changed the loop and when.
 */
export interface Machine {
  /** Path of the store file. */
  readonly path: string;

  /** Name, display unit, creation time and schema version. */
  settings(): MachineSettings;

  /** Adds an axis; names are letters, digits, '_', '-', '.', starting with a letter or digit. */
  addAxis(name: string, opts?: { note?: string; author?: string }): AxisInfo;
  /** All axes by name, with their loops. */
  listAxes(): AxisInfo[];

  /**
   * Adds a loop "AXIS/LOOP" with its first plant (variant "nominal" unless named),
   * an optional inner loop of the same axis, and an optional sample rate; writes
   * revision 1 (unity-gain compensator, no requirements) and checks it.
   */
  addLoop(ref: string, opts: { plant: string; variant?: string; inner?: string | null; sampleRateHz?: number | null; note?: string; author?: string }): Promise<ChangeOutcome>;
  /** All loops, by axis then name. */
  listLoops(): LoopInfo[];
  /** One loop's identity and head revision. */
  loopInfo(ref: string): LoopInfo;
  /** The state at a revision (default: the latest). */
  revision(ref: string, number?: number): Revision;

  /** Sets (adds or replaces) one plant variant from an expression in s. */
  setPlant(ref: string, text: string, opts?: ChangeOptions & { variant?: string }): Promise<ChangeOutcome>;
  /** Removes a plant variant (not the last one). */
  dropPlant(ref: string, variant: string, opts?: ChangeOptions): Promise<ChangeOutcome>;
  /** Adds requirements; one with the same metric and direction as an existing one replaces it. */
  setRequirements(ref: string, reqs: readonly RequirementInput[], opts?: ChangeOptions): Promise<ChangeOutcome>;
  /** Drops requirements by key: "pm" drops every pm requirement, "fc<=" only the upper limit. */
  dropRequirements(ref: string, key: string, opts?: ChangeOptions): Promise<ChangeOutcome>;
  /** Replaces the whole compensator (blocks in series, in order). */
  setCompensator(ref: string, blocks: readonly BlockInput[], opts?: ChangeOptions & { ideal?: boolean }): Promise<ChangeOutcome>;
  /** A new revision whose state equals revision `number`. */
  revert(ref: string, number: number, opts?: ChangeOptions): Promise<ChangeOutcome>;
  /**
   * Saves an edit of the compensator and/or the complete requirement list as ONE
   * revision (kind `comp` or `spec` when only one moved, `edit` when both did);
   * the same edit `whatIf` previews. An edit that changes nothing is refused.
   */
  applyEdit(ref: string, edit: LoopEdit, opts?: ChangeOptions): Promise<ChangeOutcome>;

  /** Revisions of a loop, oldest first. */
  log(ref: string): RevisionInfo[];
  /** What changed from revision a to b and the metric deltas (both analysed in today's cascade context). */
  diff(ref: string, a: number, b: number): Promise<LoopDiff>;

  /** Fresh results of the named loops (default: all); analyses only loops whose stored results are stale. */
  check(refs?: readonly string[]): Promise<CheckReport>;
  /** Analyses every loop again even when results are fresh (after an analysis upgrade; used by the bench). */
  recheckAll(): Promise<CheckReport>;

  /** One row per loop with its latest status and headline metrics. */
  overview(): Promise<OverviewRow[]>;
  /** A loop's state, fresh result with per-variant requirement results, and history. */
  loopDetail(ref: string): Promise<LoopDetail>;
  /** Changes whenever another connection commits; poll it cheaply and reload when it moves. */
  dataVersion(): number;
  /** Evaluates an unsaved compensator and/or requirements of a loop; writes nothing. */
  whatIf(ref: string, edit: WhatIfEdit): Promise<WhatIfResult>;
  /**
   * The plant each variant of a loop controls (an outer loop's: the closed inner
   * loop times its own plant, as `check` forms it), with the loop's state and the
   * inner loop's bandwidth for `sep`. At the latest revision unless a saved
   * revision or a draft state is given; may analyse a stale inner loop.
   */
  effectivePlants(ref: string, opts?: EffectivePlantsOptions): Promise<EffectivePlants>;

  /** Parses block words in the store's unit (loads the expression parser only for `expr:` blocks). */
  parseBlocks(words: readonly string[]): Promise<Block[]>;
  /** Parses requirement words in the store's unit. */
  parseRequirements(words: readonly string[]): Requirement[];

  /** The whole machine with its history as stable, sorted, diff-friendly JSON text. */
  dump(): string;

  /** Closes the store. */
  close(): void;
}

/** Options for opening a store. */
export interface OpenOptions {
  /** Author of changes when a call gives none (default: the OS user). */
  readonly author?: string;
  /** Clock for revision times (tests). */
  readonly now?: () => Date;
}

/**
 * Functions (in machine.ts):
 *   openMachine(path, opts?): Machine            an existing, initialised store; refuses a missing file,
 *                                                a file that is not a store, and a newer schema
 *   initMachine(path, {name, unit}, opts?): Machine  creates the store (or completes an empty one)
 *   loadMachine(path, dumpText, opts?): Promise<Machine>  a dump into a new or empty store, checked
 *   storeExists(path): boolean
 */
export { openMachine, initMachine, loadMachine, storeExists } from './machine.js';
export type { FreqUnit };

/** Pure helpers faces need to show engine data in the store's syntax and unit (no store, no numerics). */
export { headline } from './views.js';
export { BLOCK_SYNTAX_HELP, formatBlock } from './block-syntax.js';
export { REQUIREMENT_SYNTAX_HELP, formatMetricValue, formatRequirement, metricName } from './requirement-syntax.js';
