import { render } from 'ink-testing-library';
import { afterEach, describe, expect, it } from 'vitest';
import { App } from '../../src/tui/App.js';
import { FakeSource, unitPlantLoop } from './fake-source.js';
import { until } from './wait.js';

/**
 * The dashboard driven by keys, on a source whose loops are analysed by the
 * real core. Plant 1/(s(s+1)) under gain k has, in closed form,
 * |L(jw)| = 1 at w^2 = (sqrt(1 + 4k^2) - 1)/2 and PM = 90 deg - atan(w):
 * k = 1 gives w = 0.786 rad/s, PM = 51.8 deg; k = 4 gives w = 1.879 rad/s, PM = 28.0 deg.
 */

const ESC = '\u001b';
const ENTER = '\r';
const DOWN = '\u001b[B';

let cleanup: (() => void) | null = null;
afterEach(() => {
  cleanup?.();
  cleanup = null;
});

function start(source: FakeSource) {
  const r = render(<App source={source} colour={false} pollMs={20} now={() => Date.parse('2030-01-01T01:00:00Z')} />);
  cleanup = () => r.unmount();
  const frame = () => r.lastFrame() ?? '';
  const see = (text: string | RegExp) => until(() => (typeof text === 'string' ? frame().includes(text) : text.test(frame())), frame, String(text));
  const press = async (...keys: string[]) => {
    for (const k of keys) {
      r.stdin.write(k);
      await new Promise((res) => setTimeout(res, 0));
    }
  };
  return { ...r, frame, see, press };
}

const machine = () =>
  new FakeSource([
    unitPlantLoop('X/pos', 1, ['pm>=45']),
    unitPlantLoop('X/vel', 4, ['pm>=45'], 'X/pos'),
    unitPlantLoop('Y/pos', 1, ['pm>=45']),
  ]);

/** The line of the frame that carries the selection marker. */
const selectedLine = (frame: string) => frame.split('\n').find((l) => l.startsWith('> ')) ?? '';

describe('dashboard', () => {
  it('shows every loop with its status word and glyph, the inner loop under its outer loop', async () => {
    const ui = start(machine());
    await ui.see('Y');
    const lines = ui.frame().split('\n');
    const pos = lines.findIndex((l) => /\+ pass\s+pos/.test(l));
    expect(pos).toBeGreaterThan(0);
    expect(lines[pos + 1]).toMatch(/x fail\s+└ vel/);
    expect(lines[pos + 1]).toContain('pm 28 < 45deg');
    expect(lines[pos]).toContain('51.8');
    expect(ui.frame()).toContain('3 loops: 2 pass, 1 fail, 0 unstable');
    // The frame is one line shorter than the 24-row default window.
    expect(ui.frame().split('\n').length).toBeLessThanOrEqual(23);
  });

  it('moves the selection with j, arrows and k, and keeps it on the same loop when the store changes', async () => {
    const src = machine();
    const ui = start(src);
    await ui.see('Y');
    expect(selectedLine(ui.frame())).toMatch(/pos/);
    await ui.press('j');
    expect(selectedLine(ui.frame())).toMatch(/└ vel/);
    await ui.press(DOWN);
    await ui.see(/^> .*pos/m);
    await ui.press('k');
    await ui.see(/^> .*└ vel/m);
    // Another process adds a loop before the selected one: the selection stays on X/vel.
    src.loops.unshift(unitPlantLoop('A/new', 1, []));
    src.version++;
    await ui.see('axis A');
    expect(selectedLine(ui.frame())).toMatch(/└ vel/);
  });

  it('filters by name with / and to failing loops with f; Esc clears', async () => {
    const ui = start(machine());
    await ui.see('Y');
    await ui.press('f');
    await ui.see('failing only');
    expect(ui.frame()).not.toMatch(/\+ pass/);
    expect(ui.frame()).toMatch(/x fail/);
    await ui.press('f', '/', 'Y', ENTER);
    await ui.see('name contains "Y"');
    expect(ui.frame()).not.toContain('axis X');
    await ui.press(ESC);
    await ui.see('axis X');
  });

  it('opens a loop with Enter: checklist, blocks, then the Bode sketch with Tab; Esc goes back', async () => {
    const ui = start(machine());
    await ui.see('Y');
    await ui.press('j', ENTER);
    await ui.see('[checks]');
    expect(ui.frame()).toMatch(/x miss\s+pm >= 45deg\s+28deg/);
    expect(ui.frame()).toContain('gain:4');
    await ui.press('\t');
    await ui.see('[Bode]');
    expect(ui.frame()).toMatch(/: crossover 1\.88rad\/s/);
    expect(ui.frame()).toContain('|L| dB');
    await ui.press(ESC);
    await ui.see('axis Y');
  });

  it('edits a block and recomputes the margins as the text changes, before saving', async () => {
    const src = machine();
    const ui = start(src);
    await ui.see('Y');
    await ui.press('j', 'e');
    await ui.see('[blocks]');
    await ui.see('PM 28deg');
    await ui.press(ENTER, '\x7f', '1');
    await ui.see('gain:1_');
    await ui.see('PM 51.8deg');
    await ui.see('live: + pass');
    expect(src.saved).toHaveLength(0);
    // A half-typed block says what is wrong and keeps the last numbers.
    await ui.press('x');
    await ui.see(/live: .*gain:1x/);
    expect(ui.frame()).toContain('PM 51.8deg');
  });

  it('saves with a note through the source and returns to the overview with the new numbers', async () => {
    const src = machine();
    const ui = start(src);
    await ui.see('Y');
    await ui.press('j', 'e');
    await ui.see('[blocks]');
    await ui.press(ENTER, '\x7f', '1', ENTER, 's');
    await ui.see('note for this revision');
    await ui.press(ENTER);
    await ui.see('a note is needed');
    expect(src.saved).toHaveLength(0);
    await ui.press('less gain');
    await ui.press(ENTER);
    await ui.see('saved X/vel r3');
    expect(src.saved).toEqual([{ loopId: 'X/vel', draft: { unit: 'rad', blocks: ['gain:1'], requirements: ['pm>=45deg'] }, base: 2, note: 'less gain' }]);
    await ui.see('3 loops: 3 pass');
  });

  it('shows a conflict and keeps the draft', async () => {
    const src = machine();
    src.conflictNext = 'conflict: X/vel has changed since revision 2: revision 3 was saved by bo';
    const ui = start(src);
    await ui.see('Y');
    await ui.press('j', 'e');
    await ui.see('[blocks]');
    await ui.press(ENTER, '\x7f', '2', ENTER, 's', 'n', ENTER);
    await ui.see('conflict, not saved');
    expect(ui.frame()).toContain('saved by bo');
    expect(ui.frame()).toContain('gain:2');
    expect(ui.frame()).toContain('Edit X/vel');
  });

  it('lists every key on the help screen, from the same table as the footer', async () => {
    const ui = start(machine());
    await ui.see('Y');
    expect(ui.frame()).toMatch(/\? help\s+q quit/);
    await ui.press('?');
    await ui.see('Every screen');
    expect(ui.frame()).toContain('open the selected loop');
    await ui.press(ESC);
    await ui.see('axis Y');
  });

  it('quits with q: keys do nothing afterwards', async () => {
    const ui = start(machine());
    await ui.see('Y');
    expect(selectedLine(ui.frame())).toMatch(/pos/);
    await ui.press('q');
    await new Promise((r) => setTimeout(r, 30));
    const before = ui.frame();
    await ui.press('j', 'j');
    await new Promise((r) => setTimeout(r, 30));
    // What ink leaves as the last frame at exit differs with CI=true (where it writes frames
    // differently); in every environment the keys pressed after q must change nothing.
    expect(ui.frame()).toBe(before);
  });

  it('takes q as text while typing a filter', async () => {
    const ui = start(machine());
    await ui.see('Y');
    await ui.press('/', 'q');
    await ui.see('name contains "q_"');
    await ui.press('j');
    await ui.see('name contains "qj_"');
    await ui.press('\u0015'); // ctrl-u clears the text, as in a shell
    await ui.see('name contains "_"');
  });
});
