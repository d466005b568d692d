import type { Block, Compensator } from '../model/blocks.js';
import { UserError } from '../model/errors.js';
import type { Requirement } from '../model/requirements.js';
import type { FreqUnit } from '../model/units.js';
import { formatBlock } from './block-syntax.js';
import { canonicalJson } from './canonical-json.js';
import { makeCompensator, parseBlocks, parseRequirements } from './inputs.js';
import type { ChangeSpec } from './mutate.js';
import { requirementKey, withCompensator } from './state.js';
import type { LoopEdit, LoopState } from './types.js';

/**
 * An edit of a loop's compensator and/or its whole requirement list, as the
 * dashboard's Edit screen makes it: previewed by whatIf and saved by applyEdit
 * through the same two functions, so what was previewed is what is saved.
 */

/** An edit with its words parsed (outside any transaction); null = left as saved. */
export interface ParsedEdit {
  readonly blocks: readonly Block[] | null;
  /** undefined: keep the saved compensator's flag. */
  readonly ideal: boolean | undefined;
  readonly requirements: readonly Requirement[] | null;
}

/** Parses an edit in the store's unit; the requirement list must name each metric and direction once. */
export async function parseEdit(edit: LoopEdit, unit: FreqUnit): Promise<ParsedEdit> {
  const blocks = edit.compensator === undefined ? null : await parseBlocks(edit.compensator, unit);
  const requirements = edit.requirements === undefined ? null : edit.requirements.length === 0 ? [] : parseRequirements(edit.requirements, unit);
  if (requirements !== null) {
    const keys = requirements.map(requirementKey);
    const twice = keys.find((k, i) => keys.indexOf(k) !== i);
    if (twice !== undefined) throw new UserError(`two requirements for ${twice} in one edit; give each metric and direction once`);
  }
  return { blocks, ideal: edit.ideal, requirements };
}

/** The state after an edit; an improper compensator not marked ideal is refused. */
export function editState(s: LoopState, e: ParsedEdit, unit: FreqUnit): LoopState {
  let out = s;
  if (e.blocks !== null || e.ideal !== undefined) {
    const ideal = e.ideal ?? s.compensator.ideal === true;
    out = withCompensator(out, makeCompensator(e.blocks ?? s.compensator.blocks, ideal, unit));
  }
  if (e.requirements !== null) out = { ...out, requirements: [...e.requirements] };
  return out;
}

/** "gain:2 lead:30Hz/150Hz (ideal)" as a revision summary shows a compensator. */
export function compensatorText(c: Compensator, unit: FreqUnit): string {
  const text = c.blocks.length === 0 ? '(no blocks: unity gain)' : c.blocks.map((b) => formatBlock(b, unit)).join(' ');
  return `${text}${c.ideal ? ' (ideal)' : ''}`;
}

const same = (a: unknown, b: unknown) => canonicalJson(a) === canonicalJson(b);

/**
 * The change that saves an edit as one revision: kind `comp` or `spec` when
 * only one of them moved, `edit` when both did. An edit that changes nothing is
 * refused, so no empty revision is written.
 */
export function editChange(e: ParsedEdit, unit: FreqUnit): ChangeSpec {
  return {
    kind: 'edit',
    apply: (latest, ref) => {
      const state = editState(latest, e, unit);
      const compMoved = !same(state.compensator, latest.compensator);
      const reqsMoved = !same(state.requirements, latest.requirements);
      if (!compMoved && !reqsMoved) throw new UserError(`nothing to save: the edit equals the latest revision of ${ref}`);
      const comp = `comp ${compensatorText(state.compensator, unit)}`;
      const spec = state.requirements.length === 0 ? 'spec cleared' : `spec ${state.requirements.map((r) => r.text).join(' ')}`;
      if (compMoved && reqsMoved) return { state, summary: `edit: ${comp}; ${spec}`, kind: 'edit' };
      return compMoved ? { state, summary: comp, kind: 'comp' } : { state, summary: spec, kind: 'spec' };
    },
  };
}
