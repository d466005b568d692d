import { ConflictError, openMachine, type LoopResult, type Machine } from '../engine/index.js';
import { UserError } from '../model/errors.js';
import { checksOf, historyOf, overviewRowsOf, revisionOf, variantsOf } from './engine-adapt.js';
import { proposalNote, proposeFor, tuneMethods } from './engine-tune.js';
import { curveVariantsOf, loopCurves, type CurveVariant } from './engine-curves.js';
import type { DashSource } from './source.js';
import type {
  CompareVM, DraftVM, LoopDetailVM, OverviewVM, ProposalVM, SaveResultVM, TuneMethodVM, WhatIfVM,
} from './view-model.js';

/**
 * The dashboard's source backed by the engine: every read and every write goes
 * through src/engine, exactly as the command line does, so the two cannot
 * disagree. Bad text and conflicts come back as results, never as throws.
 */
export class EngineSource implements DashSource {
  constructor(private readonly m: Machine, private readonly author?: string) {}

  dataVersion(): number {
    return this.m.dataVersion();
  }

  async overview(): Promise<OverviewVM> {
    const rows = await this.m.overview();
    const report = await this.m.check();
    const results = new Map<string, LoopResult>(report.loops.map((r) => [r.loop, r]));
    const settings = this.m.settings();
    const newest = rows.reduce<(typeof rows)[number] | null>((a, r) => (a === null || r.head.time > a.head.time ? r : a), null);
    return {
      machine: settings.name,
      storePath: this.m.path,
      unit: settings.unit,
      lastChange: newest && { loopId: newest.loop, revision: newest.head.number, author: newest.head.author, at: newest.head.time, note: newest.head.note },
      rows: overviewRowsOf(rows, results),
    };
  }

  async loop(loopId: string): Promise<LoopDetailVM> {
    const d = await this.m.loopDetail(loopId);
    const head = d.history[d.history.length - 1] ?? d.info.head;
    const { bode, step } = await loopCurves(this.m, loopId, d.state.compensator, curveVariantsOf(d.result));
    const error = d.result.variants.find((v) => v.error !== undefined)?.error;
    const names = d.result.variants.map((v) => v.variant);
    const order = (v: string) => (names.includes(v) ? names.indexOf(v) : names.length);
    return {
      id: d.info.ref, axis: d.info.axis, name: d.info.name, unit: this.m.settings().unit,
      revision: d.result.revision, author: head.author, at: head.time, note: head.note,
      status: d.result.status, ...(error !== undefined ? { error } : {}),
      // Default variant first, as the check lists them.
      plants: Object.entries(d.state.plants)
        .map(([variant, p]) => ({ variant, text: p.text }))
        .sort((a, b) => order(a.variant) - order(b.variant)),
      innerId: d.info.inner,
      requirements: d.state.requirements,
      variants: variantsOf(d.result),
      checks: checksOf(d.result),
      blocks: d.state.compensator.blocks,
      bode, step,
      history: historyOf(d),
    };
  }

  async compare(loopId: string, revA: number, revB: number): Promise<CompareVM> {
    const diff = await this.m.diff(loopId, revA, revB);
    // Both revisions in today's cascade, as the diff analysed them; the crossover it reports is marked.
    const curves = async (n: number, side: 'from' | 'to') => {
      const state = this.m.revision(loopId, n).state;
      const variants: CurveVariant[] = [...new Set(diff.metrics.map((d) => d.variant))].map((variant) => {
        const fc = diff.metrics.find((d) => d.variant === variant && d.metric === 'crossoverRadS')?.[side] ?? null;
        return { variant, crossoversRadS: fc === null ? [] : [fc], phaseCrossoversRadS: [], stable: false, finalValue: 1 };
      });
      return (await loopCurves(this.m, loopId, state.compensator, variants, { revision: n })).bode;
    };
    return {
      loopId, unit: this.m.settings().unit,
      a: revisionOf(diff.from, diff.statusFrom), b: revisionOf(diff.to, diff.statusTo),
      statusA: diff.statusFrom, statusB: diff.statusTo,
      changes: diff.changes, deltas: diff.metrics,
      blocksA: this.m.revision(loopId, revA).state.compensator.blocks,
      blocksB: this.m.revision(loopId, revB).state.compensator.blocks,
      bodeA: await curves(revA, 'from'), bodeB: await curves(revB, 'to'),
    };
  }

  async whatIf(loopId: string, draft: DraftVM): Promise<WhatIfVM> {
    try {
      const r = await this.m.whatIf(loopId, { compensator: draft.blocks, requirements: draft.requirements });
      const blocks = await this.m.parseBlocks(draft.blocks);
      const { bode } = await loopCurves(this.m, loopId, { blocks }, curveVariantsOf(r.loop));
      return { ok: true, status: r.loop.status, variants: variantsOf(r.loop), checks: checksOf(r.loop), bode };
    } catch (e) {
      if (e instanceof UserError) return { ok: false, error: e.message };
      throw e;
    }
  }

  async save(loopId: string, draft: DraftVM, baseRevision: number, note: string): Promise<SaveResultVM> {
    // One revision for the whole draft, based on the revision it was read from: a change by someone
    // else since is refused as a conflict, and an unchanged draft is refused with the engine's reason.
    return this.write(() => this.m.applyEdit(loopId, { compensator: draft.blocks, requirements: draft.requirements }, { base: baseRevision, note, ...this.by() }));
  }

  tuneMethods(): readonly TuneMethodVM[] {
    return tuneMethods();
  }

  async propose(loopId: string, method: string): Promise<ProposalVM> {
    return proposeFor(this.m, loopId, method);
  }

  async applyProposal(loopId: string, p: ProposalVM & { ok: true }, _baseRevision: number, note: string): Promise<SaveResultVM> {
    if (!p.meets) return { ok: false, conflict: false, message: `the proposal does not meet every requirement on every variant (${p.message})` };
    // Based on the revision the design read: if the loop moved on since, the design is stale.
    return this.write(() => this.m.setCompensator(loopId, p.blocks, { base: p.baseRevision, note: proposalNote(note, p), ...this.by() }));
  }

  /** The author option, when the dashboard was given one. */
  private by(): { author?: string } {
    return this.author !== undefined ? { author: this.author } : {};
  }

  /** A write whose refusals come back as results: conflicts named, bad input as its message. */
  private async write(f: () => Promise<{ revision: { number: number } }>): Promise<SaveResultVM> {
    try {
      return { ok: true, revision: (await f()).revision.number };
    } catch (e) {
      if (e instanceof ConflictError) return { ok: false, conflict: true, message: e.message };
      if (e instanceof UserError) return { ok: false, conflict: false, message: e.message };
      throw e;
    }
  }

  close(): void {
    this.m.close();
  }
}

/** Opens a store for the dashboard (refuses a missing or foreign file with the engine's own message). */
export function openEngineSource(path: string, author?: string): EngineSource {
  return new EngineSource(openMachine(path, author !== undefined ? { author } : {}), author);
}
