import { execFileSync, spawnSync } from 'node:child_process';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openMachine } from '../../src/engine/index.js';
import { statusLabel } from '../../src/tui/status.js';

/**
 * The built CLI on a temporary demo store: once through a pipe (plain snapshot),
 * and interactively inside tmux at 80x24, driven by keys and read back with
 * capture-pane. A second process changes the store while the dashboard runs.
 */

const ROOT = path.resolve(__dirname, '../..');
const BIN = path.join(ROOT, 'bin/loopledger.mjs');
const HAS_TMUX = spawnSync('tmux', ['-V']).status === 0;
const SOCKET = `ll-e2e-${process.pid}`;
const ESC = '\u001b';

let dir: string;
let store: string;
let expected: Map<string, { status: string; revision: number }>;

const cli = (args: string[], env: NodeJS.ProcessEnv = {}) =>
  spawnSync(process.execPath, [BIN, '--store', store, ...args], { cwd: dir, encoding: 'utf8', env: { ...process.env, ...env } });

beforeAll(async () => {
  execFileSync('npm', ['run', 'build'], { cwd: ROOT, stdio: 'pipe' });
  dir = fs.mkdtempSync(path.join(os.tmpdir(), 'll-e2e-'));
  store = path.join(dir, 'demo.db');
  const made = cli(['demo']);
  expect(made.status, made.stderr).toBe(0);
  const m = openMachine(store);
  expected = new Map((await m.overview()).map((r) => [r.loop, { status: r.status, revision: r.head.number }]));
  m.close();
});

afterAll(() => {
  if (HAS_TMUX) spawnSync('tmux', ['-L', SOCKET, 'kill-server']);
  if (dir) fs.rmSync(dir, { recursive: true, force: true });
});

/** The row of a loop on screen: its status label followed by its name (indented under an outer loop). */
const rowPattern = (ref: string, status: string) => {
  const name = ref.split('/')[1]!;
  return new RegExp(`${status.replace(/[!?+]/g, (c) => `\\${c}`)}\\s+(└ )?${name}\\s`);
};

describe('not a terminal', () => {
  it('prints the overview once as plain text and exits 0', () => {
    const r = cli([]);
    expect(r.status, r.stderr).toBe(0);
    expect(r.stdout).toMatch(/^edge-finishing cell 7 .*12 loops: \d+ pass, \d+ fail, \d+ unstable/);
    for (const [ref, e] of expected) expect(r.stdout).toMatch(rowPattern(ref, statusLabel(e.status as never)));
    expect(r.stdout).not.toContain(ESC);
  });

  it('writes no escape sequence at all under NO_COLOR, nor with --no-color', () => {
    expect(cli([], { NO_COLOR: '1' }).stdout).not.toContain(ESC);
    const r = cli(['--no-color', 'dash']);
    expect(r.status).toBe(0);
    expect(r.stdout).not.toContain(ESC);
  });
});

/** Runs tmux on our own server socket, so no other session is touched. */
const tmux = (...args: string[]) => execFileSync('tmux', ['-L', SOCKET, ...args], { encoding: 'utf8' });
const screen = (session: string, escapes = false) => tmux('capture-pane', '-p', ...(escapes ? ['-e'] : []), '-t', session);

/** Polls the pane until `check` holds; the bound only ends a broken test. */
async function waitFor(session: string, check: (s: string) => boolean, what: string, boundMs = 8000): Promise<string> {
  const end = Date.now() + boundMs;
  let s = '';
  while (Date.now() < end) {
    s = screen(session);
    if (check(s)) return s;
    await new Promise((r) => setTimeout(r, 50));
  }
  throw new Error(`never saw ${what}; the screen was:\n${s}`);
}

function startDash(session: string, env = '') {
  const cmd = `cd ${dir} && ${env} CI=false TERM=xterm-256color ${process.execPath} ${BIN} --store ${store}`;
  tmux('new-session', '-d', '-s', session, '-x', '80', '-y', '24', cmd);
}

describe.skipIf(!HAS_TMUX)('in a terminal (tmux, 80x24)', () => {
  it('shows every loop with its status, opens one with a Bode sketch, shows help, quits with q', async () => {
    startDash('main');
    const s = await waitFor('main', (x) => x.includes('12 loops:'), 'the overview');
    const lines = s.split('\n');
    for (const [ref, e] of expected) expect(s).toMatch(rowPattern(ref, statusLabel(e.status as never)));
    expect(lines.every((l) => Array.from(l).length <= 80)).toBe(true);
    // The frame is at most 23 lines: the last row of the window stays empty.
    expect(lines[23] ?? '').toBe('');
    expect(s).toMatch(/\? help\s+q quit/);

    tmux('send-keys', '-t', 'main', 'j', 'Enter');
    await waitFor('main', (x) => x.includes('[checks]'), 'the loop view');
    tmux('send-keys', '-t', 'main', 'Tab');
    const bode = await waitFor('main', (x) => x.includes('[Bode]') && x.includes('|L| dB'), 'the Bode sketch');
    expect(bode).toMatch(/crossover \d/);
    expect(bode).toMatch(/^ +Hz .*\|\d/m);
    expect(bode).toMatch(/^ +0┤.*\.\.\./m);

    tmux('send-keys', '-t', 'main', '?');
    await waitFor('main', (x) => x.includes('Every screen') && x.includes('quit'), 'help');
    tmux('send-keys', '-t', 'main', 'Escape');
    await waitFor('main', (x) => x.includes('[Bode]'), 'back from help');
    tmux('send-keys', '-t', 'main', 'q');
    // The session runs only the dashboard: it ends when the dashboard exits.
    const end = Date.now() + 8000;
    while (Date.now() < end && spawnSync('tmux', ['-L', SOCKET, 'has-session', '-t', 'main']).status === 0) await new Promise((r) => setTimeout(r, 50));
    expect(spawnSync('tmux', ['-L', SOCKET, 'has-session', '-t', 'main']).status).not.toBe(0);
  });

  it('shows a change made by another process within 2 s, keeping the selection', async () => {
    startDash('live');
    const selectedLine = (x: string) => x.split('\n').find((l) => l.startsWith('> ')) ?? '';
    const first = selectedLine(await waitFor('live', (x) => x.includes('12 loops:'), 'the overview'));
    tmux('send-keys', '-t', 'live', 'j', 'j');
    const selected = selectedLine(await waitFor('live', (x) => selectedLine(x) !== first, 'the selection to move'));
    const [ref, e] = [...expected].find(([r]) => r === 'Z/pos')!;
    const changed = cli(['comp', 'set', ref, 'gain:2', 'lead:1Hz/5Hz', '-m', 'from another terminal', '--author', 'colleague']);
    expect(changed.status, changed.stderr).toBe(0);
    // Issue 5 promises a change by another process on screen within 2 s (the dashboard polls every second).
    const after = await waitFor('live', (x) => x.includes(`last change: ${ref} r${e.revision + 1} by colleague`), 'the change', 2000);
    expect(selectedLine(after).slice(0, 24)).toBe(selected.slice(0, 24));
  });

  it('draws no colour under NO_COLOR and redraws to the new size on resize', async () => {
    startDash('mono', 'NO_COLOR=1');
    await waitFor('mono', (x) => x.includes('12 loops:'), 'the overview');
    expect(screen('mono', true)).not.toMatch(/\u001b\[[0-9;]*m/);
    tmux('resize-window', '-t', 'mono', '-x', '100', '-y', '30');
    const wide = await waitFor('mono', (x) => x.split('\n').some((l) => l.length > 80), 'the wider frame');
    expect(wide.split('\n').every((l) => Array.from(l).length <= 100)).toBe(true);
    tmux('resize-window', '-t', 'mono', '-x', '80', '-y', '24');
    await waitFor('mono', (x) => x.split('\n').every((l) => Array.from(l).length <= 80) && x.includes('12 loops:'), 'the frame back at 80 columns');
  });
});

if (!HAS_TMUX) console.warn('e2e-tmux: tmux is not installed here, so the terminal tests are skipped (install tmux to run them)');
