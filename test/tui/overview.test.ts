import { describe, expect, it } from 'vitest';
import { compactNumber } from '../../src/tui/compact-number.js';
import { filterRows, missText, overviewPlain, overviewTable, placeRows } from '../../src/tui/overview-lines.js';
import { fit, truncate } from '../../src/tui/text.js';
import type { OverviewRowVM, OverviewVM } from '../../src/tui/view-model.js';

const none = { pmDeg: null, gmDb: null, crossoverRadS: null, bandwidthRadS: null, peakSensitivity: null };
const row = (id: string, outerId: string | null, status: OverviewRowVM['status'] = 'pass'): OverviewRowVM => {
  const [axis, name] = id.split('/') as [string, string];
  return { id, axis, name, outerId, revision: 1, status, summary: status, headline: none, worstMiss: null };
};

describe('overview order', () => {
  it('puts each inner loop under its outer loop, depth first, axes in order of appearance', () => {
    const rows = [row('Y/pos', null), row('X/cur', 'X/vel'), row('X/vel', 'X/pos'), row('X/pos', null), row('Y/aux', null)];
    expect(placeRows(rows).map((p) => `${'  '.repeat(p.depth)}${p.row.id}`)).toEqual(['Y/pos', 'Y/aux', 'X/pos', '  X/vel', '    X/cur']);
  });

  it('loses no loop when an outer loop is missing or the links form a cycle', () => {
    const rows = [row('A/a', 'A/b'), row('A/b', 'A/a'), row('A/c', 'A/gone')];
    expect(placeRows(rows).map((p) => p.row.id).sort()).toEqual(['A/a', 'A/b', 'A/c']);
  });

  it('filters by axis/name in any case, and to loops that do not pass', () => {
    const placed = placeRows([row('X/pos', null), row('X/vel', 'X/pos', 'fail'), row('Y/pos', null, 'unstable')]);
    expect(filterRows(placed, 'x/V', false).map((p) => p.row.id)).toEqual(['X/vel']);
    expect(filterRows(placed, '', true).map((p) => p.row.id)).toEqual(['X/vel', 'Y/pos']);
    expect(filterRows(placed, 'pos', true).map((p) => p.row.id)).toEqual(['Y/pos']);
  });
});

describe('overview table', () => {
  it('fits 80 columns with every headline column and a readable worst miss', () => {
    const r: OverviewRowVM = {
      ...row('X/velocity', null, 'fail'),
      headline: { pmDeg: 23.43, gmDb: 8.12, crossoverRadS: 2 * Math.PI * 81.2, bandwidthRadS: 2 * Math.PI * 130, peakSensitivity: 2.64 },
      worstMiss: { metric: 'pm', op: '>=', limit: 45, value: 23.43, variant: '', more: 0 },
    };
    const { titles, body } = overviewTable(placeRows([r]), 'hz', 80);
    expect(titles).toMatch(/status +loop +rev +PM deg +GM dB +fc Hz +bw Hz +Ms worst miss/);
    const line = body[1]!.text;
    expect(Array.from(line).length).toBeLessThanOrEqual(78);
    expect(line).toMatch(/^x fail +velocity +r1 +23\.4 +8\.12 +81\.2 +130 +2\.64 pm 23\.4 < 45deg$/);
  });

  it('says what is missed in few words: value, limit, variant, how many more', () => {
    expect(missText({ metric: 'gm', op: '>=', limit: 6, value: 3.1, variant: 'loaded', more: 2 }, 'hz')).toBe('gm 3.1 < 6dB (loaded) +2');
    expect(missText({ metric: 'fc', op: '<=', limit: 2 * Math.PI * 200, value: 2 * Math.PI * 250, variant: '', more: 0 }, 'hz')).toBe('fc 250 > 200Hz');
    expect(missText({ metric: 'os', op: '<=', limit: 10, value: null, variant: '', more: 0, reason: 'no step response' }, 'hz')).toBe('os: no step response');
  });

  it('prints a plain snapshot: header, counts and one line per loop, without escape sequences', () => {
    const vm: OverviewVM = { machine: 'rig', storePath: 'a.db', unit: 'rad', lastChange: null, rows: [row('X/pos', null), row('X/vel', 'X/pos', 'unstable')] };
    const text = overviewPlain(vm, 100, 0);
    expect(text[0]).toBe('rig  [a.db]  2 loops: 1 pass, 0 fail, 1 unstable');
    expect(text.filter((l) => /^  (\+ pass|! unstable)/.test(l))).toHaveLength(2);
    expect(text.join('\n')).not.toMatch(/\u001b/);
  });
});

describe('cells', () => {
  it('cuts with an ellipsis and pads to the exact width', () => {
    expect(truncate('abcdef', 4)).toBe('abc…');
    expect(truncate('abc', 4)).toBe('abc');
    expect(fit('ab', 4)).toBe('ab  ');
    expect(fit('abcdef', 4)).toBe('abc…');
  });

  it('writes numbers into narrow columns without losing the order of magnitude', () => {
    expect(compactNumber(0.00106, 4)).toBe('1e-3');
    expect(compactNumber(123456, 4)).toBe('1e5');
    expect(compactNumber(88.54, 4)).toBe('88.5');
    expect(compactNumber(-43.21, 4)).toBe('-43');
    expect(compactNumber(Infinity, 4)).toBe('inf');
    for (const x of [1e-12, -7.7e-7, 3.3e14, -2.2e22, 0.5, 99999]) expect(compactNumber(x, 5).length).toBeLessThanOrEqual(5);
  });
});
