import { frequencyRangeRadS, frequencyResponse, logGridRadS } from '../../src/analysis/freq.js';
import { analyseLoop } from '../../src/analysis/loop.js';
import { evaluateRequirement, loopStatus } from '../../src/analysis/requirements.js';
import { tfSeries } from '../../src/analysis/tf.js';
import { compensatorHfGain, compensatorTf } from '../../src/design/blocks-tf.js';
import { parseBlock } from '../../src/engine/block-syntax.js';
import { parseRequirement } from '../../src/engine/requirement-syntax.js';
import type { Block } from '../../src/model/blocks.js';
import { UserError } from '../../src/model/errors.js';
import type { LoopMetrics } from '../../src/model/metrics.js';
import type { Requirement } from '../../src/model/requirements.js';
import type { TransferFunction } from '../../src/model/tf.js';
import type { DashSource } from '../../src/tui/source.js';
import type {
  BodeVM, CheckVM, CompareVM, DraftVM, HeadlineVM, LoopDetailVM, OverviewRowVM, OverviewVM, ProposalVM, RevisionVM, SaveResultVM, WhatIfVM,
} from '../../src/tui/view-model.js';

/**
 * A dashboard source for component tests: a few loops held in memory, analysed
 * by the real analysis core (so the numbers on screen are true ones), with a
 * data version the test bumps to play "another process changed the store".
 */
export interface FakeLoop {
  readonly id: string;
  readonly outerId: string | null;
  readonly plant: TransferFunction;
  readonly plantText: string;
  blocks: Block[];
  requirements: Requirement[];
  revisions: RevisionVM[];
}

const noExpr = (): TransferFunction => {
  throw new UserError('expressions are not used in these tests');
};

/** The analysis of a loop as the view models carry it. */
function analyse(l: Pick<FakeLoop, 'plant' | 'blocks' | 'requirements'>) {
  const comp = { blocks: l.blocks };
  const m: LoopMetrics = analyseLoop(l.plant, compensatorTf(comp));
  const ctx = { compHfGain: compensatorHfGain(comp), innerBandwidthRadS: null };
  const outcomes = l.requirements.map((r) => ({ r, o: evaluateRequirement(r, m, ctx) }));
  const checks: CheckVM[] = outcomes.map(({ r, o }) => ({
    metric: r.metric, op: r.op, limit: r.value, variant: 'nominal', value: o.value, pass: o.pass, ...(o.reason ? { reason: o.reason } : {}),
  }));
  const status = loopStatus([{ metrics: m }], outcomes.map((x) => x.o));
  const headline: HeadlineVM = {
    pmDeg: m.phaseMarginDeg, gmDb: m.gainMarginDb,
    crossoverRadS: m.gainCrossoversRadS.length ? Math.max(...m.gainCrossoversRadS) : null,
    bandwidthRadS: m.bandwidthRadS, peakSensitivity: m.peakSensitivity,
  };
  const loop = tfSeries(compensatorTf(comp), l.plant);
  const [lo, hi] = frequencyRangeRadS(loop, m.gainCrossoversRadS);
  const fr = frequencyResponse(loop, logGridRadS(lo, hi, 300));
  const bode: BodeVM = {
    variant: 'nominal', wRadS: Array.from(fr.wRadS), magDb: Array.from(fr.magDb), phaseDeg: Array.from(fr.phaseDeg),
    crossoversRadS: m.gainCrossoversRadS, phaseCrossoversRadS: m.phaseCrossoversRadS,
  };
  return { m, checks, status, headline, bode };
}

export class FakeSource implements DashSource {
  version = 1;
  /** When set, the next save is refused as a conflict with this message. */
  conflictNext: string | null = null;
  readonly saved: { loopId: string; draft: DraftVM; base: number; note: string }[] = [];
  readonly whatIfCalls: DraftVM[] = [];
  closed = false;

  constructor(public loops: FakeLoop[], readonly machine = 'test rig') {}

  dataVersion(): number {
    return this.version;
  }

  private find(id: string): FakeLoop {
    const l = this.loops.find((x) => x.id === id);
    if (!l) throw new UserError(`no loop ${id}`);
    return l;
  }

  async overview(): Promise<OverviewVM> {
    const rows: OverviewRowVM[] = this.loops.map((l) => {
      const a = analyse(l);
      const miss = a.checks.find((c) => !c.pass);
      const [axis, name] = l.id.split('/') as [string, string];
      return {
        id: l.id, axis, name, outerId: l.outerId, revision: l.revisions[0]!.revision, status: a.status,
        summary: a.status, headline: a.headline,
        worstMiss: miss ? { metric: miss.metric, op: miss.op, limit: miss.limit, value: miss.value, variant: '', more: a.checks.filter((c) => !c.pass).length - 1 } : null,
      };
    });
    return { machine: this.machine, storePath: 'test.db', unit: 'rad', lastChange: null, rows };
  }

  async loop(id: string): Promise<LoopDetailVM> {
    const l = this.find(id);
    const a = analyse(l);
    const [axis, name] = id.split('/') as [string, string];
    const head = l.revisions[0]!;
    return {
      id, axis, name, unit: 'rad', revision: head.revision, author: head.author, at: head.at, note: head.note,
      status: a.status, plants: [{ variant: 'nominal', text: l.plantText }], innerId: null,
      requirements: l.requirements, checks: a.checks, blocks: l.blocks,
      variants: [{ name: 'nominal', stable: a.m.stable, headline: a.headline }],
      bode: [a.bode], step: [], history: l.revisions,
    };
  }

  async compare(): Promise<CompareVM> {
    throw new Error('not used');
  }

  async whatIf(loopId: string, draft: DraftVM): Promise<WhatIfVM> {
    this.whatIfCalls.push(draft);
    try {
      const blocks = draft.blocks.map((t) => parseBlock(t, draft.unit, noExpr));
      const requirements = draft.requirements.map((t) => parseRequirement(t, draft.unit));
      const a = analyse({ plant: this.find(loopId).plant, blocks, requirements });
      return { ok: true, status: a.status, variants: [{ name: 'nominal', stable: a.m.stable, headline: a.headline }], checks: a.checks, bode: [a.bode] };
    } catch (e) {
      if (e instanceof UserError) return { ok: false, error: e.message };
      throw e;
    }
  }

  async save(loopId: string, draft: DraftVM, base: number, note: string): Promise<SaveResultVM> {
    if (this.conflictNext !== null) {
      const message = this.conflictNext;
      this.conflictNext = null;
      return { ok: false, conflict: true, message };
    }
    const l = this.find(loopId);
    l.blocks = draft.blocks.map((t) => parseBlock(t, draft.unit, noExpr));
    l.requirements = draft.requirements.map((t) => parseRequirement(t, draft.unit));
    const revision = l.revisions[0]!.revision + 1;
    l.revisions.unshift({ revision, author: 'tester', at: '2030-01-01T00:00:00Z', note, kind: 'comp', status: null });
    this.saved.push({ loopId, draft, base, note });
    return { ok: true, revision };
  }

  tuneMethods() {
    return [];
  }

  async propose(): Promise<ProposalVM> {
    return { ok: false, error: 'none' };
  }

  async applyProposal(): Promise<SaveResultVM> {
    return { ok: false, conflict: false, message: 'none' };
  }

  close(): void {
    this.closed = true;
  }
}

/** A loop on plant 1/(s(s+1)) (a textbook shape with closed-form margins) under gain k. */
export function unitPlantLoop(id: string, k: number, reqs: string[], outerId: string | null = null): FakeLoop {
  return {
    id, outerId, plant: { num: [1], den: [0, 1, 1], delayS: 0 }, plantText: '1/(s*(s+1))',
    blocks: [{ kind: 'gain', k }],
    requirements: reqs.map((r) => parseRequirement(r, 'rad')),
    revisions: [{ revision: 2, author: 'ana', at: '2030-01-01T00:00:00Z', note: 'first tune', kind: 'comp', status: null },
      { revision: 1, author: 'ana', at: '2029-12-31T00:00:00Z', note: 'created', kind: 'create', status: null }],
  };
}
