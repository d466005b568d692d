import { describe, expect, it } from 'vitest';
import { canonicalJson, parseCanonical, parseStored, prettyJson } from '../../src/engine/canonical-json.js';

describe('canonical JSON', () => {
  const value = { zeta: [3, Infinity, -Infinity, -0], alpha: { note: 'inf', b: undefined, a: 1.5e-300 }, name: 'X "quoted"' };

  it('sorts keys, drops undefined members and gives the same bytes for equal values', () => {
    const text = canonicalJson(value);
    expect(text).toBe('{"alpha":{"a":1.5e-300,"note":"inf"},"name":"X \\"quoted\\"","zeta":[3,1e999,-1e999,0]}');
    expect(canonicalJson({ name: value.name, alpha: { a: 1.5e-300, note: 'inf' }, zeta: value.zeta })).toBe(text);
  });

  it('reads infinities back from the stored form with a plain JSON parse', () => {
    expect(parseStored<typeof value>(canonicalJson(value)).zeta).toEqual([3, Infinity, -Infinity, 0]);
  });

  it('writes "inf" in the readable form and reads it back, leaving free text alone', () => {
    const text = prettyJson(value);
    expect(text).toContain('"zeta": [3, "inf", "-inf", 0]');
    const back = parseCanonical<typeof value>(text);
    expect(back.zeta).toEqual([3, Infinity, -Infinity, 0]);
    expect(back.alpha.note).toBe('inf');
    expect(prettyJson(back)).toBe(text);
  });
});
