import type { FreqUnit } from '../model/units.js';
import type { LoopRow, RevisionHeadRow } from '../store/rows.js';
import { hashText } from './canonical-json.js';
import { loopRef } from './names.js';

/**
 * Bump whenever analysis, requirement evaluation or cascade composition changes
 * what they compute: every stored result then counts as stale and is redone.
 */
export const ANALYSIS_VERSION = 'analysis-4';

/**
 * The loops of a machine (or of one axis: cascades never cross axes) with their
 * latest revisions, and who depends on whom. Knows only hashes, never states,
 * so deciding whether stored results are fresh needs no parsing and no numerics.
 */
export class LoopGraph {
  readonly loops = new Map<number, LoopRow>();
  readonly heads = new Map<number, RevisionHeadRow>();
  private readonly outers = new Map<number, number[]>();
  private readonly chainMemo = new Map<number, string>();

  constructor(loops: readonly LoopRow[], heads: readonly RevisionHeadRow[], readonly unit: FreqUnit) {
    for (const l of loops) this.loops.set(l.id, l);
    for (const h of heads) if (this.loops.has(h.loop_id)) this.heads.set(h.loop_id, h);
    for (const l of loops) {
      if (l.inner_loop_id === null) continue;
      const list = this.outers.get(l.inner_loop_id) ?? [];
      list.push(l.id);
      this.outers.set(l.inner_loop_id, list);
    }
  }

  /** "AXIS/LOOP" of a loop id. */
  ref(id: number): string {
    const l = this.loop(id);
    return loopRef(l.axis, l.name);
  }

  loop(id: number): LoopRow {
    const l = this.loops.get(id);
    if (!l) throw new Error(`loop id ${id} is not in this graph`);
    return l;
  }

  head(id: number): RevisionHeadRow {
    const h = this.heads.get(id);
    if (!h) throw new Error(`loop ${this.ref(id)} has no revision`);
    return h;
  }

  /** Loops that have `id` as their inner loop. */
  outerOf(id: number): readonly number[] {
    return this.outers.get(id) ?? [];
  }

  /** Every loop built on `id`, directly or through other loops (not `id` itself). */
  dependants(id: number): number[] {
    const out: number[] = [];
    const walk = (x: number) => {
      for (const o of this.outerOf(x)) {
        if (!out.includes(o)) {
          out.push(o);
          walk(o);
        }
      }
    };
    walk(id);
    return out;
  }

  /** How many loops sit inside this one (0 for an innermost loop). */
  depth(id: number): number {
    let d = 0;
    for (let x = this.loop(id).inner_loop_id; x !== null; x = this.loop(x).inner_loop_id) {
      if (++d > 64) throw new Error(`loop cascade through ${this.ref(id)} does not end`);
    }
    return d;
  }

  /** `ids` plus every loop inside them, innermost first. */
  withInnerChains(ids: Iterable<number>): number[] {
    const set = new Set<number>();
    for (const id of ids) for (let x: number | null = id; x !== null; x = this.loop(x).inner_loop_id) set.add(x);
    return [...set].sort((a, b) => this.depth(a) - this.depth(b) || a - b);
  }

  /** Hash of the dynamics of a loop and everything inside it: what an outer loop's result depends on. */
  chainHash(id: number): string {
    let h = this.chainMemo.get(id);
    if (h === undefined) {
      const inner = this.loop(id).inner_loop_id;
      h = hashText(`${this.head(id).dynamics_hash}|${inner === null ? '-' : this.chainHash(inner)}`);
      this.chainMemo.set(id, h);
    }
    return h;
  }

  /** Hash of every input of a loop's result, for its latest state or for another state of it. */
  inputHash(id: number, stateHash = this.head(id).state_hash): string {
    const l = this.loop(id);
    const inner = l.inner_loop_id === null ? '-' : this.chainHash(l.inner_loop_id);
    return hashText(`${ANALYSIS_VERSION}|${this.unit}|${stateHash}|${l.sample_rate_hz ?? '-'}|${inner}`);
  }
}
