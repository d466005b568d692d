import path from 'node:path';
import Database from 'better-sqlite3';
import { describe, expect, it } from 'vitest';
import { ok, storeCli, tempDir } from './run.js';

/**
 * Results cached by an older build must never crash a command: a row this
 * build cannot read is analysed again and replaced.
 *
 * The loop is L = 400/(s (s + 20)) with unity gain: wn = 20 rad/s, zeta = 0.5,
 * PM = atan(2 zeta / sqrt(sqrt(1 + 4 zeta^4) - 2 zeta^2)) = 51.83 deg
 * (Ogata, Modern Control Engineering, 5th ed., sec. 7-7; from memory). It is type 1,
 * so Kp is infinite (the value an older layout wrote as the string "inf") and Kv = 400/20 = 20.
 * T = 400/(s^2 + 20 s + 400) has no zeros: overshoot 100 exp(-pi zeta / sqrt(1 - zeta^2)) = 16.3 %
 * (Ogata, 5th ed., sec. 5-3; from memory).
 */
const PM_DEG = (Math.atan(1 / Math.sqrt(Math.sqrt(1 + 4 * 0.5 ** 4) - 2 * 0.5 ** 2)) * 180) / Math.PI;
const OVERSHOOT_PCT = 100 * Math.exp((-Math.PI * 0.5) / Math.sqrt(1 - 0.25));

async function storeWithLoop(): Promise<{ run: ReturnType<typeof storeCli>; file: string }> {
  const file = path.join(tempDir(), 'old.loopledger.db');
  const run = storeCli(file);
  ok(await run('init', '--name', 'old rig', '--units', 'rad'));
  ok(await run('axis', 'add', 'A'));
  ok(await run('loop', 'add', 'A/pos', '--plant', '400/(s*(s+20))'));
  ok(await run('spec', 'A/pos', 'pm>=45'));
  return { run, file };
}

/** Runs SQL on the store file, as an older build (or a hand) would have left it. */
function sql<T>(file: string, f: (db: Database.Database) => T): T {
  const db = new Database(file);
  try {
    return f(db);
  } finally {
    db.close();
  }
}

const resultRows = (file: string) => sql(file, (db) => db.prepare('SELECT revision, status, result_json FROM result WHERE revision = 2').all() as { revision: number; status: string; result_json: string }[]);

// What older layouts could have left in result_json for the same inputs.
const OLD_FORMS: readonly [string, (json: string) => string][] = [
  ['infinities as strings', (j) => j.replaceAll('1e999', '"inf"')],
  ['not JSON at all', () => '{"loop":"A/pos","variants":[{'],
  ['another layout (snake_case keys)', (j) => j.replaceAll('"phaseMarginDeg"', '"phase_margin_deg"')],
  ['metrics without the step block', (j) => j.replace(/"step":\{[^}]*\}/, '"steps":null')],
];

describe('stored results written by an older build', () => {
  for (const [what, rewrite] of OLD_FORMS) {
    it(`are analysed again, never crash loop show, check or diff: ${what}`, async () => {
      const { run, file } = await storeWithLoop();
      const [good] = resultRows(file);
      expect(good!.result_json).toContain('1e999');
      sql(file, (db) => db.prepare('UPDATE result SET result_json = ? WHERE revision = 2').run(rewrite(good!.result_json)));

      const shown = ok(await run('loop', 'show', 'A/pos'));
      expect(shown).toMatch(/status: \+ pass/);
      expect(shown).toMatch(/phase margin +51\.8deg/);
      expect(shown).toMatch(/Kp Kv Ka +inf 20 /);
      expect(shown).toMatch(/overshoot +16\.3%/);
      expect(OVERSHOOT_PCT).toBeCloseTo(16.3, 1);
      // The unreadable row was replaced by a fresh one: the next check reads it without analysing.
      const [fixed] = resultRows(file);
      expect(fixed!.result_json).toContain('1e999');
      expect(fixed!.result_json).not.toContain('"inf"');
      const report = JSON.parse(ok(await run('check', '--json')));
      expect(report.reanalysed).toBe(0);
      expect(report.loops[0].variants[0].metrics.phase_margin_deg).toBeCloseTo(PM_DEG, 6);
      expect(report.loops[0].variants[0].metrics.kp).toBe('inf');
    });
  }

  it('are analysed again by check and diff when they are the first to read them', async () => {
    const { run, file } = await storeWithLoop();
    ok(await run('comp', 'set', 'A/pos', 'gain:0.5'));
    sql(file, (db) => db.prepare("UPDATE result SET result_json = replace(result_json, '1e999', '\"inf\"')").run());
    const report = JSON.parse(ok(await run('check', '--json')));
    expect(report.status).toBe('pass');
    expect(report.reanalysed).toBe(1);
    const diff = ok(await run('diff', 'A/pos', '2', '3'));
    expect(diff).toContain('revision 2 (+ pass) -> revision 3 (+ pass)');
    expect(JSON.parse(ok(await run('check', '--json'))).reanalysed).toBe(0);
  });
});
