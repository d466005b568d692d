import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterEach, expect, vi } from 'vitest';
import { main } from '../../src/cli/main.js';

/** Runs the command line in-process and captures what it writes. */

const dirs: string[] = [];
afterEach(() => {
  for (const d of dirs.splice(0)) fs.rmSync(d, { recursive: true, force: true });
});

/** A fresh temporary directory, removed after the test. */
export function tempDir(): string {
  const d = fs.mkdtempSync(path.join(os.tmpdir(), 'loopledger-cli-'));
  dirs.push(d);
  return d;
}

export interface RunResult {
  readonly code: number;
  readonly out: string;
  readonly err: string;
}

/** main(argv) with stdout and stderr captured. */
export async function cli(...argv: string[]): Promise<RunResult> {
  let out = '';
  let err = '';
  const o = vi.spyOn(process.stdout, 'write').mockImplementation((chunk: string | Uint8Array) => ((out += String(chunk)), true));
  const e = vi.spyOn(process.stderr, 'write').mockImplementation((chunk: string | Uint8Array) => ((err += String(chunk)), true));
  try {
    const code = await main(argv);
    return { code, out, err };
  } finally {
    o.mockRestore();
    e.mockRestore();
  }
}

/** A runner bound to one store path. */
export function storeCli(file: string): (...argv: string[]) => Promise<RunResult> {
  return (...argv) => cli('--store', file, ...argv);
}

/** Asserts a clean success and returns stdout. */
export function ok(r: RunResult): string {
  expect(r.err, `stderr: ${r.err}`).toBe('');
  expect(r.code).toBe(0);
  return r.out;
}

/** Asserts a refusal of bad input: exit 2, exactly one line on stderr, nothing on stdout. Returns the line. */
export function refused(r: RunResult): string {
  expect(r.out, 'nothing on stdout').toBe('');
  expect(r.code, `stderr: ${r.err}`).toBe(2);
  expect(r.err.endsWith('\n')).toBe(true);
  expect(r.err.trimEnd().split('\n')).toHaveLength(1);
  expect(r.err).not.toMatch(/internal error|\n\s+at /);
  return r.err.trim();
}
