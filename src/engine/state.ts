import type { Compensator } from '../model/blocks.js';
import { UserError } from '../model/errors.js';
import type { Requirement } from '../model/requirements.js';
import { canonicalJson, hashText, parseStored } from './canonical-json.js';
import { dropKey } from './requirement-syntax.js';
import type { LoopState, PlantVariant } from './types.js';

/** The variant a new loop's first plant gets unless named. */
export const DEFAULT_VARIANT = 'nominal';

/** Variant names in display order: "nominal" (or else the first by name) first, then by name. */
export function variantOrder(names: Iterable<string>): string[] {
  const sorted = [...new Set(names)].sort();
  const i = sorted.indexOf(DEFAULT_VARIANT);
  if (i > 0) sorted.unshift(...sorted.splice(i, 1));
  return sorted;
}

/** The variant used where a loop has no variant of a requested name. */
export function defaultVariant(state: LoopState): string {
  return variantOrder(Object.keys(state.plants))[0]!;
}

/** A new loop: one plant, no requirements, unity-gain compensator (no blocks). */
export function initialState(variant: string, plant: PlantVariant): LoopState {
  return { plants: { [variant]: plant }, requirements: [], compensator: { blocks: [] } };
}

/** Identifies a requirement within a loop: metric and direction, e.g. "fc>=". */
export function requirementKey(r: Requirement): string {
  return `${r.metric}${r.op}`;
}

/** Adds or replaces one plant variant. */
export function withPlant(s: LoopState, variant: string, plant: PlantVariant): LoopState {
  return { ...s, plants: { ...s.plants, [variant]: plant } };
}

/** Removes a variant; the last one cannot go. */
export function withoutPlant(s: LoopState, variant: string, ref: string): LoopState {
  if (!(variant in s.plants)) throw new UserError(`${ref} has no plant variant '${variant}'; it has ${Object.keys(s.plants).join(', ')}`);
  if (Object.keys(s.plants).length === 1) throw new UserError(`${ref}: '${variant}' is the only plant variant and cannot be dropped; set another first`);
  const plants = { ...s.plants };
  delete plants[variant];
  return { ...s, plants };
}

/** Adds requirements; one with an existing key replaces it in place. */
export function withRequirements(s: LoopState, reqs: readonly Requirement[]): LoopState {
  const out = [...s.requirements];
  for (const r of reqs) {
    const i = out.findIndex((x) => requirementKey(x) === requirementKey(r));
    if (i >= 0) out[i] = r;
    else out.push(r);
  }
  return { ...s, requirements: out };
}

/** Drops requirements matching "pm" (both directions) or "pm>=" (one); "estep"/"eramp"/"eparab" drop kp/kv/ka limits. */
export function withoutRequirements(s: LoopState, key: string, ref: string): LoopState {
  const k = dropKey(key);
  const keep = s.requirements.filter((r) => !(r.metric === k || requirementKey(r) === k));
  if (keep.length === s.requirements.length) {
    const have = s.requirements.map(requirementKey).join(', ') || 'none';
    throw new UserError(`${ref} has no requirement '${key}' to drop; it has: ${have} (drop by metric, e.g. pm, by metric and direction, e.g. fc<=, or by error, e.g. eramp)`);
  }
  return { ...s, requirements: keep };
}

/** Replaces the compensator. */
export function withCompensator(s: LoopState, c: Compensator): LoopState {
  return { ...s, compensator: c };
}

/** Storage form of a state and its two hashes. */
export interface EncodedState {
  readonly json: string;
  /** Everything in the state. */
  readonly stateHash: string;
  /** Only what an outer loop sees: plants and compensator. */
  readonly dynamicsHash: string;
}

/** Canonical JSON and hashes of a state. */
export function encodeState(s: LoopState): EncodedState {
  const json = canonicalJson(s);
  return { json, stateHash: hashText(json), dynamicsHash: hashText(canonicalJson({ plants: s.plants, compensator: s.compensator })) };
}

/** Reads a stored state. */
export function decodeState(json: string): LoopState {
  return parseStored<LoopState>(json);
}
