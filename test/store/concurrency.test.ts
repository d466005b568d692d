import { spawn } from 'node:child_process';
import path from 'node:path';
import Database from 'better-sqlite3';
import { describe, expect, it } from 'vitest';
import { openMachine } from '../../src/engine/index.js';
import { newMachine, track } from '../engine/helpers.js';

const CHILD = path.join(__dirname, 'saver-child.ts');

/** Starts a saver process; `lines` fills as it reports. */
function saver(file: string, ref: string, count: number, mode: 'based' | 'latest', author: string) {
  const child = spawn(process.execPath, ['--import', 'tsx', CHILD, file, ref, String(count), mode, author], { stdio: ['ignore', 'pipe', 'pipe'] });
  const lines: string[] = [];
  let partial = '';
  let stderr = '';
  child.stdout.on('data', (d: Buffer) => {
    const parts = (partial + d.toString()).split('\n');
    partial = parts.pop()!;
    lines.push(...parts);
  });
  child.stderr.on('data', (d: Buffer) => (stderr += d.toString()));
  const done = new Promise<number | null>((resolve) => child.on('close', (code) => resolve(code)));
  return { child, lines, done, stderr: () => stderr };
}

function integrity(file: string): string {
  const db = new Database(file, { readonly: true });
  try {
    return db.pragma('integrity_check', { simple: true }) as string;
  } finally {
    db.close();
  }
}

async function storeWithLoop() {
  const { m, file } = newMachine('rad');
  m.addAxis('X');
  await m.addLoop('X/vel', { plant: '1/(s+1)' });
  m.close();
  return file;
}

describe('two processes saving to one loop', () => {
  it('lands or refuses every save; nothing is lost or doubled', async () => {
    const file = await storeWithLoop();
    const a = saver(file, 'X/vel', 200, 'based', 'ann');
    const b = saver(file, 'X/vel', 200, 'based', 'bob');
    const codes = await Promise.all([a.done, b.done]);
    expect(codes, a.stderr() + b.stderr()).toEqual([0, 0]);
    const landed = [...a.lines, ...b.lines].filter((l) => l.startsWith('landed ')).map((l) => Number(l.slice(7)));
    const conflicts = [...a.lines, ...b.lines].filter((l) => l.startsWith('conflict ')).length;
    expect(landed.length + conflicts).toBe(400);
    const m = track(openMachine(file));
    const log = m.log('X/vel');
    expect(log.length).toBe(1 + landed.length);
    // Every reported number is a distinct revision, and together they are exactly revisions 2..n.
    expect([...landed].sort((x, y) => x - y)).toEqual(log.slice(1).map((r) => r.number));
    // Each save was based on the revision before it (conflicts were refused, never forced).
    expect(log.slice(1).every((r) => r.parent === r.number - 1)).toBe(true);
    // And each landed under its own author.
    for (const [who, s] of [['ann', a], ['bob', b]] as const) {
      const mine = s.lines.filter((l) => l.startsWith('landed ')).map((l) => Number(l.slice(7)));
      expect(mine.every((n) => log[n - 1]!.author === who)).toBe(true);
    }
    expect(integrity(file)).toBe('ok');
  });
});

describe('a saver killed mid-stream', () => {
  it('leaves a store that opens, passes the integrity check and holds every reported revision', async () => {
    const file = await storeWithLoop();
    const s = saver(file, 'X/vel', 100000, 'latest', 'ann');
    await new Promise<void>((resolve, reject) => {
      const timer = setInterval(() => {
        if (s.lines.length >= 40) {
          clearInterval(timer);
          s.child.kill('SIGKILL');
          resolve();
        } else if (s.child.exitCode !== null) {
          clearInterval(timer);
          reject(new Error(`saver exited early: ${s.stderr()}`));
        }
      }, 5);
    });
    await s.done;
    const reported = s.lines.filter((l) => l.startsWith('landed ')).map((l) => Number(l.slice(7)));
    expect(reported.length).toBeGreaterThanOrEqual(40);
    expect(integrity(file)).toBe('ok');
    const m = track(openMachine(file));
    const numbers = new Set(m.log('X/vel').map((r) => r.number));
    for (const n of reported) expect(numbers.has(n)).toBe(true);
    // Revisions are contiguous: the kill at most cut off a save that was never reported.
    expect(Math.max(...numbers)).toBe(numbers.size);
    expect((await m.check()).loops[0]!.loop).toBe('X/vel');
  });
});
