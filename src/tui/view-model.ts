import type { Block } from '../model/blocks.js';
import type { FreqUnit } from '../model/units.js';
import type { Comparison, LoopStatus, MetricKey, Requirement } from '../model/requirements.js';

/**
 * What the dashboard shows, as plain data. The presentation functions take these
 * and return lines; a source (src/tui/source.ts) fills them from the engine, and
 * tests build them by hand. All frequencies rad/s, times s, margins deg / dB.
 * Strings here are raw store text: presentation cleans them before display.
 */

/** The headline numbers of one loop (the worst variant where there are several). */
export interface HeadlineVM {
  readonly pmDeg: number | null;
  readonly gmDb: number | null;
  readonly crossoverRadS: number | null;
  readonly bandwidthRadS: number | null;
  readonly peakSensitivity: number | null;
}

/** A requirement that is missed, for the overview's "worst miss" column. */
export interface MissVM {
  readonly metric: MetricKey;
  readonly op: Comparison;
  readonly limit: number;
  /** null when the value cannot be computed; `reason` then says why. */
  readonly value: number | null;
  /** Empty when the loop has one variant. */
  readonly variant: string;
  readonly reason?: string;
  /** How many other requirements also fail. */
  readonly more: number;
}

/** One row of the overview: one loop. */
export interface OverviewRowVM {
  /** Stable key across reloads, e.g. "X/pos". */
  readonly id: string;
  readonly axis: string;
  readonly name: string;
  /** Id of the loop this one is the inner loop of, or null for an outermost loop. */
  readonly outerId: string | null;
  readonly revision: number;
  readonly status: LoopStatus;
  /** The engine's one-line verdict ("unstable closed loop (loaded)"). */
  readonly summary: string;
  /** Why the loop could not be analysed (status `error`). */
  readonly error?: string;
  readonly headline: HeadlineVM;
  readonly worstMiss: MissVM | null;
}

/** Who changed what last, for the header. */
export interface LastChangeVM {
  readonly loopId: string;
  readonly revision: number;
  readonly author: string;
  /** ISO 8601. */
  readonly at: string;
  readonly note: string;
}

export interface OverviewVM {
  readonly machine: string;
  readonly storePath: string;
  readonly unit: FreqUnit;
  readonly lastChange: LastChangeVM | null;
  readonly rows: readonly OverviewRowVM[];
}

/** One requirement judged on one variant. */
export interface CheckVM {
  readonly metric: MetricKey;
  readonly op: Comparison;
  readonly limit: number;
  readonly variant: string;
  readonly value: number | null;
  readonly pass: boolean;
  readonly reason?: string;
}

/** Open-loop frequency response on any increasing grid, for the Bode sketch. */
export interface BodeVM {
  readonly variant: string;
  readonly wRadS: readonly number[];
  readonly magDb: readonly number[];
  readonly phaseDeg: readonly number[];
  /** Gain crossovers (|L| = 1) and phase crossovers, to mark on the sketch. */
  readonly crossoversRadS: readonly number[];
  readonly phaseCrossoversRadS: readonly number[];
}

/** Unit-step response of the closed loop: output y and control effort u. */
export interface StepVM {
  readonly variant: string;
  readonly tS: readonly number[];
  readonly y: readonly number[];
  readonly u: readonly number[];
  readonly finalValue: number;
}

/** Per-variant analysis summary. */
export interface VariantVM {
  readonly name: string;
  readonly stable: boolean;
  readonly error?: string;
  readonly headline: HeadlineVM;
}

/** Everything the loop view shows. */
export interface LoopDetailVM {
  readonly id: string;
  readonly axis: string;
  readonly name: string;
  readonly unit: FreqUnit;
  readonly revision: number;
  readonly author: string;
  readonly at: string;
  readonly note: string;
  readonly status: LoopStatus;
  readonly error?: string;
  readonly plants: readonly { readonly variant: string; readonly text: string }[];
  readonly innerId: string | null;
  readonly requirements: readonly Requirement[];
  readonly variants: readonly VariantVM[];
  readonly checks: readonly CheckVM[];
  readonly blocks: readonly Block[];
  readonly bode: readonly BodeVM[];
  readonly step: readonly StepVM[];
  /** Newest first. */
  readonly history: readonly RevisionVM[];
}

/** One revision in a loop's history. */
export interface RevisionVM {
  readonly revision: number;
  readonly author: string;
  readonly at: string;
  readonly note: string;
  /** What the revision changed: "comp", "plant", "spec", "create", ... */
  readonly kind: string;
  /** Status the loop had right after this revision; null when never checked. */
  readonly status: LoopStatus | null;
}

/** One changed item between two revisions; texts in the store's syntax and unit. */
export interface ChangeVM {
  readonly what: string;
  readonly key: string | null;
  readonly from: string | null;
  readonly to: string | null;
}

/** One metric of one variant at two revisions (metric keys as the engine names them, e.g. "phaseMarginDeg"). */
export interface DeltaVM {
  readonly variant: string;
  readonly metric: string;
  readonly from: number | null;
  readonly to: number | null;
  readonly delta: number | null;
}

/** Two revisions of a loop side by side. */
export interface CompareVM {
  readonly loopId: string;
  readonly unit: FreqUnit;
  readonly a: RevisionVM;
  readonly b: RevisionVM;
  readonly statusA: LoopStatus;
  readonly statusB: LoopStatus;
  readonly changes: readonly ChangeVM[];
  /** The compensator at each revision, for the side-by-side block table. */
  readonly blocksA: readonly Block[];
  readonly blocksB: readonly Block[];
  readonly deltas: readonly DeltaVM[];
  /** Per variant, same order in both. */
  readonly bodeA: readonly BodeVM[];
  readonly bodeB: readonly BodeVM[];
}

/** A live recompute of an unsaved draft: what the loop would be. */
export type WhatIfVM =
  | {
      readonly ok: true;
      readonly status: LoopStatus;
      readonly variants: readonly VariantVM[];
      readonly checks: readonly CheckVM[];
      readonly bode: readonly BodeVM[];
    }
  | { readonly ok: false; readonly error: string };

/** Result of a save through the engine. */
export type SaveResultVM =
  | { readonly ok: true; readonly revision: number }
  | { readonly ok: false; readonly conflict: boolean; readonly message: string };

/** An unsaved compensator and requirement list, as the user types it (block / requirement syntax). */
export interface DraftVM {
  /** Unit of bare frequencies in the texts. */
  readonly unit: FreqUnit;
  readonly blocks: readonly string[];
  readonly requirements: readonly string[];
}

/** A design method the Tune screen can run. */
export interface TuneMethodVM {
  readonly key: string;
  readonly label: string;
}

/** The design assistant's proposal. */
export type ProposalVM =
  | {
      readonly ok: true;
      readonly method: string;
      /** The revision the design read; applying it is based on this one. */
      readonly baseRevision: number;
      /** True only when every variant is stable and meets every requirement: only then may it be applied. */
      readonly meets: boolean;
      readonly message: string;
      /** Worksheet lines, frequencies in the store's unit. */
      readonly worksheet: readonly string[];
      readonly blocks: readonly Block[];
      readonly status: LoopStatus;
      readonly variants: readonly VariantVM[];
      readonly checks: readonly CheckVM[];
    }
  | { readonly ok: false; readonly error: string };
