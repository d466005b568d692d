import { describe, expect, it } from 'vitest';
import { cleanText, hasControl } from '../../src/tui/sanitize.js';
import { overviewPlain } from '../../src/tui/overview-lines.js';
import type { OverviewVM } from '../../src/tui/view-model.js';

/**
 * Forms from ECMA-48, 5th edition (1991): C0 and C1 control sets (5.2, 5.3),
 * control sequences CSI P...P I...I F with parameter bytes 03/00-03/15,
 * intermediates 02/00-02/15 and final 04/00-07/14 (5.4), control strings
 * opened by DCS, OSC, PM, APC, SOS and closed by ST (5.6); xterm also accepts
 * BEL as the end of OSC. Bidirectional controls from Unicode UAX #9 (2.1-2.7).
 */
describe('cleanText', () => {
  const cases: [string, string, string][] = [
    ['erase display (CSI J)', 'a\u001b[2Jb', 'ab'],
    ['SGR colour with parameters', '\u001b[1;31mred\u001b[0m', 'red'],
    ['private-mode CSI (hide cursor)', 'x\u001b[?25ly', 'xy'],
    ['CSI with an intermediate byte', 'p\u001b[0 qq', 'pq'],
    ['8-bit CSI (C1 0x9b)', 'a\u009b31mb', 'ab'],
    ['OSC window title ended by BEL', '\u001b]0;owned\u0007note', 'note'],
    ['OSC 52 clipboard write ended by ST', 'n\u001b]52;c;ZWNobw==\u001b\\ote', 'note'],
    ['DCS string', '\u001bPq#0;2;0;0;0\u001b\\done', 'done'],
    ['unterminated OSC swallows the rest', 'ok\u001b]0;title', 'ok'],
    ['two-byte escape (RIS full reset)', 'a\u001bcb', 'ab'],
    ['lone ESC at the end', 'abc\u001b', 'abc'],
    ['C0 controls: BEL, backspace, NUL', 'a\u0007b\u0008c\u0000d', 'abcd'],
    ['DEL and C1 NEL', 'a\u007fb\u0085c', 'abc'],
    ['tab and line breaks become one space', 'lead\tlag\r\nnotch', 'lead lag notch'],
    ['right-to-left override (UAX #9)', 'gain\u202e2.0', 'gain2.0'],
    ['first-strong isolate (UAX #9)', 'a\u2068b\u2069c', 'abc'],
    ['plain text is left alone', 'X/pos: lead 30Hz/150Hz, pm>=45deg (µ, ü)', 'X/pos: lead 30Hz/150Hz, pm>=45deg (µ, ü)'],
  ];
  for (const [what, input, want] of cases) {
    it(what, () => {
      expect(cleanText(input)).toBe(want);
      expect(hasControl(cleanText(input))).toBe(false);
    });
  }
});

describe('store strings on screen', () => {
  it('never reach the terminal raw in the plain overview', () => {
    const vm: OverviewVM = {
      machine: 'rig\u001b[2J', storePath: 'x.db', unit: 'hz',
      lastChange: { loopId: 'X/pos', revision: 2, author: 'eve\u001b]0;pwn\u0007', at: '2030-01-01T00:00:00Z', note: 'clear\u001b[3J\u001b[H me' },
      rows: [{
        id: 'X/pos', axis: 'X\u001b[31m', name: 'pos\u009b2J', outerId: null, revision: 2, status: 'error', summary: 'error',
        error: 'bad\u0007 plant', headline: { pmDeg: null, gmDb: null, crossoverRadS: null, bandwidthRadS: null, peakSensitivity: null }, worstMiss: null,
      }],
    };
    const text = overviewPlain(vm, 100, Date.parse('2030-01-01T00:01:00Z')).join('\n');
    expect(text).not.toMatch(/[\u0000-\u0009\u000b-\u001f\u007f-\u009f]/);
    expect(text).toContain('clear me');
    expect(text).toContain('bad plant');
  });
});
