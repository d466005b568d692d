import { describe, expect, it } from 'vitest';
import { act, backspace, editLoaded, saveDone, typeText, type ActContext } from '../../src/tui/actions.js';
import { currentScreen, initialState, type DashState } from '../../src/tui/dash-state.js';
import type { Action } from '../../src/tui/keys.js';
import type { LoopDetailVM } from '../../src/tui/view-model.js';

const ctx = (over: Partial<ActContext> = {}): ActContext => ({
  storeUnit: 'hz', overviewIds: ['X/pos', 'X/vel', 'Y/pos'], historyRevisions: [5, 4, 3], tuneMethods: ['lead', 'lag'],
  contentRows: 40, pageRows: 10, panes: 3, variants: 2, ...over,
});

/** Runs actions in order; returns the final state and the effects asked for. */
function run(s: DashState, actions: Action[], c = ctx()) {
  const effects = [];
  for (const a of actions) {
    const step = act(s, a, c);
    s = step.state;
    if (step.effect) effects.push(step.effect);
  }
  return { s, effects };
}

const detail = { id: 'X/vel', unit: 'hz', revision: 5, blocks: [{ kind: 'gain', k: 2 }, { kind: 'lead', zeroRadS: 2 * Math.PI * 30, poleRadS: 2 * Math.PI * 150 }], requirements: [{ metric: 'pm', op: '>=', value: 45, text: 'pm>=45' }] } as unknown as LoopDetailVM;

/** The edit screen on X/vel with its draft loaded. */
function editing(): DashState {
  const { s, effects } = run(initialState(), ['down', 'edit']);
  expect(effects).toEqual([{ kind: 'startEdit', loopId: 'X/vel' }]);
  return editLoaded(s, detail);
}

describe('controller', () => {
  it('moves the selection by loop id and clamps at the ends', () => {
    expect(run(initialState(), ['down', 'down', 'down', 'down']).s.selectedId).toBe('Y/pos');
    expect(run(initialState(), ['end', 'up']).s.selectedId).toBe('X/vel');
    expect(run(initialState(), ['pageDown']).s.selectedId).toBe('Y/pos');
    expect(run(initialState(), ['down', 'home']).s.selectedId).toBe('X/pos');
  });

  it('opens the selected loop, cycles panes and variants, and comes back with Esc', () => {
    const { s } = run(initialState(), ['down', 'open', 'pane', 'pane', 'pane', 'pane', 'variant']);
    expect(currentScreen(s)).toBe('loop');
    expect(s.loopId).toBe('X/vel');
    expect(s.pane).toBe(1);
    expect(s.variant).toBe(1);
    expect(currentScreen(run(s, ['back']).s)).toBe('overview');
  });

  it('toggles the display unit away from the store unit and back', () => {
    expect(run(initialState(), ['unit']).s.unit).toBe('rad');
    expect(run(initialState(), ['unit', 'unit']).s.unit).toBe('hz');
  });

  it('loads the draft in the store unit', () => {
    const s = editing();
    expect(s.edit?.blocks).toEqual(['gain:2', 'lead:30Hz/150Hz']);
    expect(s.edit?.requirements).toEqual(['pm>=45deg']);
    expect(s.edit?.baseRevision).toBe(5);
  });

  it('types into a field, and Esc gives back the old text', () => {
    let s = run(editing(), ['down', 'fieldEdit']).s;
    s = backspace(backspace(backspace(typeText(s, ['x']))));
    expect(s.edit?.blocks[1]).toBe('lead:30Hz/150');
    s = run(s, ['cancel']).s;
    expect(s.edit?.blocks[1]).toBe('lead:30Hz/150Hz');
    expect(s.typing).toBeNull();
  });

  it('adds a block after the cursor; Esc on the new empty row removes it', () => {
    let s = run(editing(), ['addBlock']).s;
    expect(s.edit?.blocks).toEqual(['gain:2', '', 'lead:30Hz/150Hz']);
    s = typeText(s, ['i', 'n', 't']);
    expect(run(s, ['accept']).s.edit?.blocks).toEqual(['gain:2', 'int', 'lead:30Hz/150Hz']);
    expect(run(s, ['cancel']).s.edit?.blocks).toEqual(['gain:2', 'lead:30Hz/150Hz']);
  });

  it('adds a requirement at the end of the requirement list and removes rows', () => {
    let s = run(editing(), ['addRequirement']).s;
    s = run(typeText(s, Array.from('gm>=6dB')), ['accept']).s;
    expect(s.edit?.requirements).toEqual(['pm>=45deg', 'gm>=6dB']);
    s = run(s, ['remove']).s;
    expect(s.edit?.requirements).toEqual(['pm>=45deg']);
  });

  it('asks for a second Esc before throwing a changed draft away', () => {
    const s = run(editing(), ['remove', 'back']).s;
    expect(currentScreen(s)).toBe('edit');
    expect(s.message?.text).toMatch(/Esc again/);
    expect(currentScreen(run(s, ['back']).s)).toBe('overview');
  });

  it('saves only with a note, as an effect carrying the draft and its base revision', () => {
    let s = run(editing(), ['save']).s;
    expect(s.typing).toBe('note');
    let r = run(s, ['accept']);
    expect(r.effects).toEqual([]);
    expect(r.s.message?.text).toMatch(/note is needed/);
    s = typeText(s, Array.from('lead for the loaded case'));
    r = run(s, ['accept']);
    expect(r.effects).toEqual([{ kind: 'save', loopId: 'X/vel', baseRevision: 5, note: 'lead for the loaded case', draft: { unit: 'hz', blocks: ['gain:2', 'lead:30Hz/150Hz'], requirements: ['pm>=45deg'] } }]);
  });

  it('keeps the draft on a conflict and leaves the screen on success', () => {
    const s = editing();
    const conflict = saveDone(s, 'X/vel', { ok: false, conflict: true, message: 'revision 6 was saved by bo' });
    expect(currentScreen(conflict)).toBe('edit');
    expect(conflict.edit?.blocks).toEqual(['gain:2', 'lead:30Hz/150Hz']);
    expect(conflict.message).toEqual({ text: 'conflict, not saved: revision 6 was saved by bo', kind: 'error' });
    const ok = saveDone(s, 'X/vel', { ok: true, revision: 6 });
    expect(currentScreen(ok)).toBe('overview');
    expect(ok.edit).toBeNull();
    expect(ok.message?.text).toBe('saved X/vel r6');
  });

  it('compares the cursor with the revision before it, or with the marked one', () => {
    const onHistory = run(initialState(), ['history']).s;
    expect(run(onHistory, ['compare']).s.compare).toEqual({ a: 4, b: 5 });
    expect(run(onHistory, ['mark', 'down', 'down', 'compare']).s.compare).toEqual({ a: 3, b: 5 });
    const first = run(onHistory, ['end', 'compare']).s;
    expect(currentScreen(first)).toBe('history');
    expect(first.message?.text).toMatch(/first revision/);
  });

  it('on the tune screen j/k pick a method and the page keys scroll the worksheet', () => {
    const s = run(initialState(), ['open', 'tune', 'down', 'pageDown']).s;
    expect(s.tuneMethod).toBe('lag');
    expect(s.scroll).toBe(9);
    expect(run(s, ['run']).effects).toEqual([{ kind: 'propose', loopId: 'X/pos', method: 'lag' }]);
  });
});
