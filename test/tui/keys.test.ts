import { describe, expect, it } from 'vitest';
import type { Key } from 'ink';
import { footerLine, helpKeys, helpLines } from '../../src/tui/help-lines.js';
import { keyNames } from '../../src/tui/key-name.js';
import { KEY_TABLE, activeBindings, type KeyScope, type Screen, type Typing } from '../../src/tui/keys.js';

const screens: Screen[] = ['overview', 'loop', 'history', 'compare', 'edit', 'tune'];
const typings: Typing[] = [null, 'filter', 'field', 'note'];

/** Every scope the dashboard can be in. */
function* allScopes(): Generator<KeyScope> {
  for (const screen of screens) for (const help of [false, true]) for (const typing of typings)
    for (const hasSelection of [false, true]) for (const hasProposal of [false, true]) for (const canTune of [false, true])
      yield { screen, help, typing, hasSelection, hasProposal, canTune };
}

describe('key table', () => {
  it('never gives one key two meanings at once', () => {
    for (const scope of allScopes()) {
      const seen = new Map<string, string>();
      for (const b of activeBindings(scope)) {
        for (const k of b.keys) {
          expect(seen.get(k), `${k} in ${JSON.stringify(scope)}`).toBeUndefined();
          seen.set(k, b.handler);
        }
      }
    }
  });

  it('always offers a way out: Esc or q works in every scope', () => {
    for (const scope of allScopes()) {
      const keys = activeBindings(scope).flatMap((b) => b.keys);
      expect(keys.includes('esc') || keys.includes('q'), JSON.stringify(scope)).toBe(true);
    }
  });

  it('keeps ? help and q quit on the 80-column footer whenever they work', () => {
    for (const scope of allScopes()) {
      const line = footerLine(scope, 80);
      expect(Array.from(line).length).toBeLessThanOrEqual(80);
      const active = activeBindings(scope).map((b) => b.handler);
      if (active.includes('help')) expect(line).toContain('? help');
      if (active.includes('quit')) expect(line).toContain('q quit');
    }
  });

  it('cuts the footer between items, never inside one, and shows save while editing', () => {
    for (const scope of allScopes()) {
      const line = footerLine(scope, 80);
      expect(line, JSON.stringify(scope)).not.toMatch(/\S…/);
    }
    const edit = [...allScopes()].find((s) => s.screen === 'edit' && s.typing === null && !s.help);
    expect(edit).toBeDefined();
    expect(footerLine(edit!, 80)).toContain('s save');
  });

  it('lists every binding on the help screen', () => {
    const text = helpLines(100).join('\n');
    for (const b of KEY_TABLE) expect(text, b.help).toContain(`${helpKeys(b)}`);
    for (const b of KEY_TABLE) expect(text).toContain(b.help);
  });

  it('lets text through while typing: only Enter and Esc are bindings', () => {
    for (const typing of ['filter', 'field', 'note'] as const) {
      const keys = activeBindings({ screen: 'edit', help: false, typing, hasSelection: true, hasProposal: true, canTune: true }).flatMap((b) => b.keys);
      expect(keys.sort()).toEqual(['enter', 'esc']);
    }
  });
});

const key = (over: Partial<Key> = {}): Key => ({
  upArrow: false, downArrow: false, leftArrow: false, rightArrow: false, pageDown: false, pageUp: false, home: false, end: false,
  return: false, escape: false, ctrl: false, shift: false, tab: false, backspace: false, delete: false, meta: false,
  super: false, hyper: false, capsLock: false, numLock: false, ...over,
});

describe('key names', () => {
  it('names special keys', () => {
    expect(keyNames('', key({ downArrow: true }))).toEqual(['down']);
    expect(keyNames('', key({ pageDown: true }))).toEqual(['pgdn']);
    expect(keyNames('\r', key({ return: true }))).toEqual(['enter']);
    expect(keyNames('', key({ escape: true }))).toEqual(['esc']);
    expect(keyNames('d', key({ ctrl: true }))).toEqual(['ctrl-d']);
    // Terminals send DEL for Backspace; ink calls it delete.
    expect(keyNames('', key({ delete: true }))).toEqual(['backspace']);
  });

  it('splits a chunk typed or pasted at once, naming the controls inside it', () => {
    expect(keyNames('j\r', key())).toEqual(['j', 'enter']);
    expect(keyNames('a b\t', key())).toEqual(['a', 'space', 'b', 'tab']);
    expect(keyNames('x\u0007y', key())).toEqual(['x', 'y']);
  });
});
