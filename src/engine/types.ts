import type { Block, Compensator } from '../model/blocks.js';
import type { LoopMetrics } from '../model/metrics.js';
import type { LoopStatus, Requirement, RequirementResult } from '../model/requirements.js';
import type { TransferFunction } from '../model/tf.js';
import type { FreqUnit } from '../model/units.js';

/**
 * The public data shapes of the engine (src/engine/index.ts). Loops are named
 * "AXIS/LOOP" everywhere; frequencies are rad/s; times are ISO-8601 UTC strings.
 */

/** Settings of the whole machine (one store). */
export interface MachineSettings {
  readonly name: string;
  /** How screens show frequencies; input accepts either unit with a suffix. */
  readonly unit: FreqUnit;
  readonly createdAt: string;
  /** The store's schema version (highest applied migration). */
  readonly schemaVersion: number;
}

/** One plant model of a loop: the text as typed and its parsed form (so nothing is parsed again). */
export interface PlantVariant {
  readonly text: string;
  readonly tf: TransferFunction;
}

/** Everything that defines a loop after one revision. */
export interface LoopState {
  /** Plant variants by name; requirements must hold for every one. */
  readonly plants: Readonly<Record<string, PlantVariant>>;
  /** At most one requirement per (metric, op) pair. */
  readonly requirements: readonly Requirement[];
  readonly compensator: Compensator;
}

/** What a revision changed. `create` is a loop's first revision; `edit` changed compensator and requirements together. */
export type RevisionKind = 'create' | 'plant' | 'spec' | 'comp' | 'revert' | 'edit';

/** One saved change to a loop, without its state. */
export interface RevisionInfo {
  /** "AXIS/LOOP" */
  readonly loop: string;
  /** 1, 2, 3 ... per loop. */
  readonly number: number;
  /** The revision this change was based on (null for the first). */
  readonly parent: number | null;
  readonly kind: RevisionKind;
  readonly author: string;
  /** ISO-8601 UTC. */
  readonly time: string;
  readonly note: string;
  /** One line saying what changed, e.g. "comp: gain:2 lead:30Hz/150Hz". */
  readonly summary: string;
  /**
   * The loop's status as checked when this revision was saved (in the same
   * transaction, with the inner loops of that moment); null where no check was
   * stored with the save (older revisions of a loaded dump).
   */
  readonly status: LoopStatus | null;
}

/** A revision with the full loop state after it. */
export interface Revision extends RevisionInfo {
  readonly state: LoopState;
}

export interface AxisInfo {
  readonly name: string;
  readonly note: string;
  readonly author: string;
  readonly createdAt: string;
  /** "AXIS/LOOP" of its loops, by name. */
  readonly loops: readonly string[];
}

/** A loop's identity and place in its cascade. */
export interface LoopInfo {
  /** "AXIS/LOOP" */
  readonly ref: string;
  readonly axis: string;
  readonly name: string;
  /** "AXIS/LOOP" of the loop nested inside this one, or null. */
  readonly inner: string | null;
  /** Loops that have this one as their inner loop. */
  readonly outer: readonly string[];
  readonly sampleRateHz: number | null;
  /** The latest revision. */
  readonly head: RevisionInfo;
}

/** The check of one plant variant of a loop. */
export interface VariantResult {
  readonly variant: string;
  readonly status: LoopStatus;
  /** null when the variant could not be analysed (see `error`). */
  readonly metrics: LoopMetrics | null;
  readonly error?: string;
  readonly requirements: readonly RequirementResult[];
  readonly warnings: readonly string[];
}

/** The check of one loop at one revision. */
export interface LoopResult {
  readonly loop: string;
  readonly revision: number;
  readonly status: LoopStatus;
  /** One line: "pass", "fail: pm 38deg, needs >= 45deg (loaded)", "unstable (nominal)", "error: ...". */
  readonly summary: string;
  /** In the order of the loop's variants (the default variant first). */
  readonly variants: readonly VariantResult[];
  /** Every failing requirement over all variants. */
  readonly failures: readonly RequirementResult[];
  /** Hash of everything the result depends on. */
  readonly inputHash: string;
  readonly computedAt: string;
}

/** Outcome of a change: the new revision and every loop that was rechecked because of it. */
export interface ChangeOutcome {
  readonly revision: RevisionInfo;
  /** This loop first, then its dependants (outer loops), inner before outer. */
  readonly results: readonly LoopResult[];
}

/** Options every change accepts. */
export interface ChangeOptions {
  readonly note?: string;
  /** Defaults to the OS user. */
  readonly author?: string;
  /**
   * The revision the change was based on. When the loop has moved on since, the
   * change is refused with a ConflictError unless `force`. Without `base` the
   * change is based on the latest revision, read and written in one transaction.
   */
  readonly base?: number;
  readonly force?: boolean;
}

/** A compensator as typed block words ("gain:2", "lead:30Hz/150Hz") or as blocks. */
export type BlockInput = string | Block;

/** A requirement as typed ("pm>=45") or parsed. */
export type RequirementInput = string | Requirement;

/** The headline numbers of a loop: the worst value over its variants (the gain margin nearest 0 dB, signed). */
export interface Headline {
  readonly phaseMarginDeg: number | null;
  readonly gainMarginDb: number | null;
  readonly crossoverRadS: number | null;
  readonly bandwidthRadS: number | null;
  readonly peakSensitivity: number | null;
  readonly overshootPct: number | null;
}

/** One row of the machine overview. */
export interface OverviewRow {
  readonly loop: string;
  readonly axis: string;
  readonly name: string;
  readonly inner: string | null;
  readonly head: RevisionInfo;
  readonly status: LoopStatus;
  readonly summary: string;
  readonly headline: Headline;
  readonly variants: readonly string[];
}

/** Everything a loop screen shows. */
export interface LoopDetail {
  readonly info: LoopInfo;
  readonly state: LoopState;
  readonly result: LoopResult;
  readonly history: readonly RevisionInfo[];
}

/** Result of `check`. */
export interface CheckReport {
  readonly loops: readonly LoopResult[];
  /** Worst status over the checked loops (error > unstable > fail > pass). */
  readonly status: 'pass' | 'fail' | 'unstable' | 'error';
  readonly counts: Readonly<Record<'pass' | 'fail' | 'unstable' | 'error', number>>;
  /** How many loops had to be analysed again (the rest were fresh in the store). */
  readonly reanalysed: number;
}

/** One changed item between two revisions; texts are in the store's display unit. */
export interface StateChange {
  readonly what: 'plant' | 'requirement' | 'compensator';
  /** Variant name for plants, requirement key ("pm>=") for requirements. */
  readonly key: string | null;
  readonly from: string | null;
  readonly to: string | null;
}

/** One metric of one variant at two revisions. */
export interface MetricDelta {
  readonly variant: string;
  /** A LoopMetrics key or "step.<key>" for step metrics. */
  readonly metric: string;
  readonly from: number | null;
  readonly to: number | null;
  /** to - from when both exist. */
  readonly delta: number | null;
}

/** What changed between two revisions of a loop, and what it did to the metrics. */
export interface LoopDiff {
  readonly loop: string;
  readonly from: RevisionInfo;
  readonly to: RevisionInfo;
  readonly changes: readonly StateChange[];
  readonly statusFrom: LoopStatus;
  readonly statusTo: LoopStatus;
  readonly metrics: readonly MetricDelta[];
}

/** An edit of a loop's compensator and/or requirements: previewed by `whatIf`, saved by `applyEdit`. */
export interface LoopEdit {
  /** The whole compensator (replaces the saved one). */
  readonly compensator?: readonly BlockInput[];
  /** Marks the compensator ideal (improper allowed); omitted: the saved compensator's flag is kept. */
  readonly ideal?: boolean;
  /** The complete requirement list (replaces the saved one; [] for none). */
  readonly requirements?: readonly RequirementInput[];
}

/** An unsaved edit evaluated for live editing; nothing is written. */
export type WhatIfEdit = LoopEdit;

export interface WhatIfResult {
  readonly loop: LoopResult;
  /** Outer loops as they would be with the edit. */
  readonly dependants: readonly LoopResult[];
}

/** Which state of a loop `effectivePlants` forms plants for (default: the latest revision). */
export interface EffectivePlantsOptions {
  /** A saved revision of the loop. */
  readonly revision?: number;
  /** An unsaved state of the loop (a draft); the other loops stay at their latest revisions. */
  readonly state?: LoopState;
}

/** The plant one variant of a loop controls. */
export interface VariantPlant {
  readonly variant: string;
  /** Own plant, behind the closed inner loop for an outer loop (as `check` forms it). */
  readonly tf: TransferFunction;
  /** How it was formed, e.g. a delayed inner loop entering as a Pade approximant. */
  readonly warnings: readonly string[];
  /** The inner loop's variant used with this one; null without an inner loop. */
  readonly innerVariant: string | null;
  /** That inner variant's closed-loop bandwidth in its fresh result (what `sep` compares with); null when none. */
  readonly innerBandwidthRadS: number | null;
}

/** What design and curves need of a loop: its state and the plant of each variant. */
export interface EffectivePlants {
  readonly loop: string;
  /** The revision the state is from (for a draft: the latest, which the draft is based on). */
  readonly revision: number;
  /** Plants as typed, requirements and compensator. */
  readonly state: LoopState;
  /** Default variant first, in the order `check` lists them. */
  readonly variants: readonly VariantPlant[];
  /** Every variant's warnings, once each. */
  readonly warnings: readonly string[];
  /** "AXIS/LOOP" of the inner loop, or null. */
  readonly inner: string | null;
  /** Inner bandwidth for the default variant (variants[0]); null without an inner loop or bandwidth. */
  readonly innerBandwidthRadS: number | null;
}
