import type {
  CompareVM, DraftVM, LoopDetailVM, OverviewVM, ProposalVM, SaveResultVM, TuneMethodVM, WhatIfVM,
} from './view-model.js';

/**
 * Everything the dashboard reads or writes, as one interface. The real one wraps
 * the engine (src/tui/engine-source.ts); tests pass a hand-built one. Reads are
 * async because the engine may have to analyse a loop first; the data version
 * is a single pragma and stays synchronous so polling it costs nothing.
 */
export interface DashSource {
  /** Changes whenever another process commits to the store. */
  dataVersion(): number;
  overview(): Promise<OverviewVM>;
  /** One loop with its checks, curves and history. */
  loop(loopId: string): Promise<LoopDetailVM>;
  compare(loopId: string, revA: number, revB: number): Promise<CompareVM>;
  /** Recomputes an unsaved draft; writes nothing. Bad text gives `{ok: false}`, never a throw. */
  whatIf(loopId: string, draft: DraftVM): Promise<WhatIfVM>;
  /** Saves a draft based on `baseRevision`; a stale base is a conflict result, not a throw. */
  save(loopId: string, draft: DraftVM, baseRevision: number, note: string): Promise<SaveResultVM>;
  /** Design methods available (empty when the design assistant is not there). */
  tuneMethods(): readonly TuneMethodVM[];
  propose(loopId: string, method: string): Promise<ProposalVM>;
  /** Saves a proposal (its worksheet goes into the revision note after the user's words). */
  applyProposal(loopId: string, proposal: ProposalVM & { ok: true }, baseRevision: number, note: string): Promise<SaveResultVM>;
  close(): void;
}
