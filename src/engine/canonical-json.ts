import { createHash } from 'node:crypto';

/**
 * Canonical JSON: object keys sorted, no undefined members. The same value
 * always gives the same bytes, which makes hashes stable and dumps diff-friendly.
 * Infinities: the stored (compact) form writes them as the JSON numbers 1e999 and
 * -1e999, which JSON.parse reads back as +-Infinity with no reviver (fast for
 * check); the readable form (dumps) writes "inf"/"-inf" like every other JSON
 * loopledger prints.
 */

type Json = null | boolean | number | string | Json[] | { [k: string]: Json };

/** Replaces non-JSON numbers and drops undefined members, sorting keys. */
function normalise(v: unknown, where: string): Json {
  if (v === null) return null;
  switch (typeof v) {
    case 'number':
      if (Number.isNaN(v)) throw new Error(`canonical JSON: NaN at ${where}`);
      if (v === Infinity) return 'inf';
      if (v === -Infinity) return '-inf';
      return Object.is(v, -0) ? 0 : v;
    case 'string':
    case 'boolean':
      return v;
    case 'object': {
      if (Array.isArray(v)) return v.map((x, i) => normalise(x, `${where}[${i}]`));
      const out: { [k: string]: Json } = {};
      for (const k of Object.keys(v as object).sort()) {
        const x = (v as Record<string, unknown>)[k];
        if (x !== undefined) out[k] = normalise(x, `${where}.${k}`);
      }
      return out;
    }
    default:
      throw new Error(`canonical JSON: cannot encode ${typeof v} at ${where}`);
  }
}

/** Compact canonical JSON (for storage and hashing); read it back with parseStored. */
export function canonicalJson(v: unknown): string {
  if (v === null) return 'null';
  switch (typeof v) {
    case 'number':
      if (v === Infinity) return '1e999';
      if (v === -Infinity) return '-1e999';
      return Number.isNaN(v) ? 'null' : JSON.stringify(Object.is(v, -0) ? 0 : v);
    case 'string':
    case 'boolean':
      return JSON.stringify(v);
    case 'object': {
      if (Array.isArray(v)) return '[' + v.map((x) => (x === undefined ? 'null' : canonicalJson(x))).join(',') + ']';
      const parts: string[] = [];
      for (const k of Object.keys(v as object).sort()) {
        const x = (v as Record<string, unknown>)[k];
        if (x !== undefined) parts.push(JSON.stringify(k) + ':' + canonicalJson(x));
      }
      return '{' + parts.join(',') + '}';
    }
    default:
      throw new Error(`canonical JSON: cannot encode ${typeof v}`);
  }
}

/** Reads the stored (compact) form. */
export function parseStored<T>(text: string): T {
  return JSON.parse(text) as T;
}

/**
 * Readable canonical JSON: two-space indent, but arrays of plain values, and
 * short objects of plain values (a block, a requirement, a coefficient set), on
 * one line, so a changed number is a one-line diff.
 */
export function prettyJson(v: unknown): string {
  return pretty(normalise(v, '$'), '') + '\n';
}

/** Longest object written on one line. */
const INLINE_MAX = 100;

function pretty(v: Json, indent: string): string {
  if (v === null || typeof v !== 'object') return JSON.stringify(v);
  const inner = indent + '  ';
  if (Array.isArray(v)) {
    if (v.length === 0) return '[]';
    if (v.every((x) => x === null || typeof x !== 'object')) return '[' + v.map((x) => JSON.stringify(x)).join(', ') + ']';
    return '[\n' + v.map((x) => inner + pretty(x, inner)).join(',\n') + '\n' + indent + ']';
  }
  const keys = Object.keys(v);
  if (keys.length === 0) return '{}';
  const flat = (x: Json) => x === null || typeof x !== 'object' || (Array.isArray(x) && x.every((y) => y === null || typeof y !== 'object'));
  if (keys.every((k) => flat(v[k]!))) {
    const line = '{' + keys.map((k) => `${JSON.stringify(k)}: ${pretty(v[k]!, inner)}`).join(', ') + '}';
    if (line.length <= INLINE_MAX) return line;
  }
  return '{\n' + keys.map((k) => `${inner}${JSON.stringify(k)}: ${pretty(v[k]!, inner)}`).join(',\n') + '\n' + indent + '}';
}

/**
 * Parses the readable form (a dump), turning "inf"/"-inf" back into numbers
 * except under keys that hold free text (`text`, `note`, `summary`, names).
 */
export function parseCanonical<T>(text: string): T {
  return JSON.parse(text, (key, value) => {
    if ((value === 'inf' || value === '-inf') && !TEXT_KEYS.has(key)) return value === 'inf' ? Infinity : -Infinity;
    return value;
  }) as T;
}

const TEXT_KEYS = new Set(['text', 'note', 'summary', 'name', 'author', 'variant', 'inner', 'reason', 'error', 'loop']);

/** Short content hash (SHA-256, hex, 32 characters). */
export function hashText(text: string): string {
  return createHash('sha256').update(text).digest('hex').slice(0, 32);
}
