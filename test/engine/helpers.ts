import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterEach } from 'vitest';
import { initMachine, type Machine } from '../../src/engine/index.js';

const dirs: string[] = [];
const opened: Machine[] = [];

afterEach(() => {
  for (const m of opened.splice(0)) m.close();
  for (const d of dirs.splice(0)) fs.rmSync(d, { recursive: true, force: true });
});

/** A fresh temporary directory, removed after the test. */
export function tempDir(): string {
  const d = fs.mkdtempSync(path.join(os.tmpdir(), 'loopledger-test-'));
  dirs.push(d);
  return d;
}

/** A clock that starts at a fixed instant and moves one second per call, so revision times are predictable. */
export function steppingClock(start = Date.UTC(2030, 0, 2, 3, 4, 5)): () => Date {
  let t = start;
  return () => new Date((t += 1000));
}

/** A new store in a temp dir, closed after the test. */
export function newMachine(unit: 'hz' | 'rad' = 'rad', name = 'test rig'): { m: Machine; file: string } {
  const file = path.join(tempDir(), 'machine.loopledger.db');
  const m = track(initMachine(file, { name, unit }, { author: 'ann', now: steppingClock() }));
  return { m, file };
}

/** Closes the machine after the test. */
export function track(m: Machine): Machine {
  opened.push(m);
  return m;
}

/** The thrown error of an async call. */
export async function rejection(p: Promise<unknown>): Promise<Error> {
  try {
    await p;
  } catch (e) {
    return e as Error;
  }
  throw new Error('expected a rejection');
}

/** The thrown error of a sync call. */
export function thrown(f: () => unknown): Error {
  try {
    f();
  } catch (e) {
    return e as Error;
  }
  throw new Error('expected an error');
}
