import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { beforeAll, describe, expect, it } from 'vitest';
import { tempDir } from './run.js';

/** The shipped command as a real process: `node bin/loopledger.mjs` on the bundled build. */

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
const TRACE_HOOK = path.join(ROOT, 'test/cli/trace/trace-loads.mjs');

beforeAll(() => {
  const b = spawnSync(process.execPath, ['scripts/build.mjs'], { cwd: ROOT, encoding: 'utf8' });
  expect(b.status, b.stderr).toBe(0);
});

interface Proc { code: number | null; out: string; err: string; loaded: string[] }

/** Runs the bin; with `trace`, also lists the modules the process loaded. */
function bin(args: string[], opts: { cwd?: string; trace?: boolean } = {}): Proc {
  const traceFile = opts.trace ? path.join(tempDir(), 'trace.txt') : '';
  const pre = opts.trace ? ['--import', TRACE_HOOK] : [];
  const r = spawnSync(process.execPath, [...pre, path.join(ROOT, 'bin/loopledger.mjs'), ...args], {
    cwd: opts.cwd ?? ROOT, encoding: 'utf8', env: { ...process.env, LOOPLEDGER_TRACE: traceFile, LOOPLEDGER_STORE: '' },
  });
  const loaded = opts.trace && fs.existsSync(traceFile) ? fs.readFileSync(traceFile, 'utf8').split('\n').filter(Boolean) : [];
  return { code: r.status, out: r.stdout, err: r.stderr, loaded };
}

/** Texts only the code of ink (its refusal of raw mode) and of mathjs's parser (an error message) hold. */
const INK_MARKER = 'Raw mode is not supported';
const MATHJS_MARKER = 'Parenthesis ) expected';

/** True when the process loaded a module (bundled chunk or package file) holding `marker`, or required `pkg`. */
function loaded(p: Proc, pkg: string, marker: string): boolean {
  return p.loaded.some((l) => {
    if (l.startsWith('cjs ')) return l.includes(`/${pkg}/`) || l.startsWith(`cjs ${pkg}`);
    if (!l.startsWith('esm file:') || !/\.m?js$/.test(l)) return false;
    const file = fileURLToPath(l.slice(4));
    return file.includes(`/node_modules/${pkg}/`) || fs.readFileSync(file, 'utf8').includes(marker);
  });
}
const loadedMathjs = (p: Proc) => loaded(p, 'mathjs', MATHJS_MARKER);
const loadedInk = (p: Proc) => loaded(p, 'ink', INK_MARKER);

describe('loopledger as a process', () => {
  it('demo in the working directory, then check: exit codes, output, and what gets loaded', () => {
    const cwd = tempDir();
    const demo = bin(['demo'], { cwd });
    expect(demo.code, demo.err).toBe(0);
    expect(demo.out).toMatch(/^created demo\.loopledger\.db: machine 'edge-finishing cell 7'/);
    expect(fs.existsSync(path.join(cwd, 'demo.loopledger.db'))).toBe(true);

    const check = bin(['--store', 'demo.loopledger.db', 'check'], { cwd, trace: true });
    expect(check.code).toBe(1);
    expect(check.err).toBe('');
    expect(check.out).toMatch(/^Y\/pos +x fail /m);
    expect(check.loaded.some((l) => l.includes('better-sqlite3'))).toBe(true); // the trace works
    expect(loadedMathjs(check)).toBe(false);
    expect(loadedInk(check)).toBe(false);

    for (const args of [['log', 'X/vel'], ['loop', 'list'], ['check', '--json']]) {
      const p = bin(['--store', 'demo.loopledger.db', ...args], { cwd, trace: true });
      expect(p.err).toBe('');
      expect(loadedMathjs(p), args.join(' ')).toBe(false);
      expect(loadedInk(p), args.join(' ')).toBe(false);
    }
    // Control: a command that parses an expression does load mathjs, so the checks above can fail.
    const add = bin(['--store', 'demo.loopledger.db', 'loop', 'add', 'X/extra', '--plant', '1/(s+1)'], { cwd, trace: true });
    expect(add.code, add.err).toBe(0);
    expect(loadedMathjs(add)).toBe(true);
    // And the ink marker is really in the build, so its absence above means something.
    expect(fs.readdirSync(path.join(ROOT, 'dist')).some((f) => f.endsWith('.js') && fs.readFileSync(path.join(ROOT, 'dist', f), 'utf8').includes(INK_MARKER))).toBe(true);
  });

  it('refuses bad input with status 2, one line on stderr, nothing on stdout', () => {
    const cwd = tempDir();
    for (const args of [['check', '--frob'], ['--store', 'none.db', 'check'], ['loop', 'add', 'X/vel', '--plant', '1/(s+']]) {
      const p = bin(args, { cwd });
      expect(p.code, args.join(' ')).toBe(2);
      expect(p.out).toBe('');
      expect(p.err.trimEnd().split('\n')).toHaveLength(1);
    }
    expect(fs.readdirSync(cwd)).toEqual([]);
  });
});
