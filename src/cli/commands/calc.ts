import { createReadStream, existsSync } from 'node:fs';
import { createInterface } from 'node:readline';
import { parseArgs } from 'node:util';
import { argError } from '../args.js';
import type { LoopMetrics } from '../../model/metrics.js';
import { UserError } from '../../model/errors.js';
import type { CommandContext } from '../context.js';

/**
 * `loopledger calc`: one loop from expressions, no store. The analysis (and the
 * expression parser with it) is imported only once arguments are valid.
 */

const HELP = `usage: loopledger calc --plant EXPR [--comp EXPR] [--ideal] [--json]
       loopledger calc --batch FILE|-

Analyses the unity-feedback loop L = C·P. Expressions are rational in s (rad/s)
with one optional delay factor exp(-T*s), e.g. --plant '400/(s*(s+20))'.

  --plant EXPR   plant model (proper)
  --comp EXPR    compensator (default 1); must be proper unless --ideal
  --ideal        accept an improper compensator (step metrics then unavailable)
  --json         print the contract JSON object instead of a summary
  --batch FILE   JSON lines {"plant": EXPR, "comp": EXPR} in (FILE or - for stdin),
                 one JSON object per line out, same order; a bad line gives {"error": ...}`;

type Analyse = (plant: string, comp: string, opts: { ideal?: boolean }) => LoopMetrics;
type ToJson = (m: LoopMetrics) => Record<string, unknown>;

/** Loads the analysis on demand. */
export async function loadAnalysis(): Promise<{ analyse: Analyse; toJson: ToJson }> {
  const [loop, json] = await Promise.all([import('../../analysis/loop-text.js'), import('../../analysis/contract-json.js')]);
  return { analyse: loop.analyseExpressions, toJson: json.metricsToContractJson };
}

/** Number with 4 significant digits; inf for infinities; 'none' for null. */
function num(x: number | null, unit = ''): string {
  if (x === null || Number.isNaN(x)) return 'none';
  if (!Number.isFinite(x)) return x > 0 ? 'inf' : '-inf';
  if (x === 0) return unit === '' ? '0' : `0 ${unit}`;
  const s = Math.abs(x) >= 1e-3 && Math.abs(x) < 1e6 ? String(Number(x.toPrecision(4))) : x.toExponential(3);
  return unit === '' ? s : `${s} ${unit}`;
}

/** Frequency with unit, writing 0 and inf in words that read well. */
function freq(w: number | null): string {
  if (w === 0) return 'w = 0';
  if (w === Infinity) return 'w -> inf';
  return num(w, 'rad/s');
}

/** The readable summary of one loop. */
export function summaryLines(m: LoopMetrics): string[] {
  const poles = m.closedLoopPoles.map((p) => (p.im === 0 ? num(p.re) : `${num(p.re)}${p.im > 0 ? '+' : '-'}${num(Math.abs(p.im))}j`));
  const pmList = m.gainCrossoversRadS.map((w, i) => `${num(m.phaseMarginsDeg[i]!, 'deg')} at ${freq(w)}`);
  const gmList = m.phaseCrossoversRadS.map((w, i) => `${num(m.gainMarginsDb[i]!, 'dB')} at ${freq(w)}`);
  const lines = [
    `stable               ${m.stable ? 'yes' : 'NO'}`,
    `closed-loop poles    ${poles.length > 0 ? poles.join(', ') : 'none'}`,
    `closed-loop DC gain  ${num(m.closedLoopDcGain)}`,
    `system type          ${m.systemType}   Kp ${num(m.kp)}   Kv ${num(m.kv, '1/s')}   Ka ${num(m.ka, '1/s^2')}`,
    `phase margin         ${m.phaseMarginDeg === null ? 'none (no gain crossover)' : `${num(m.phaseMarginDeg, 'deg')} at ${freq(m.phaseMarginAtRadS)}`}`,
  ];
  if (pmList.length > 1) lines.push(`  all crossovers     ${pmList.join('; ')}`);
  lines.push(`gain margin          ${m.gainMarginDb === null ? 'none (no phase crossover)' : `${num(m.gainMarginDb, 'dB')} at ${freq(m.gainMarginAtRadS)}`}`);
  if (gmList.length > 1) {
    lines.push(`  upper / lower      ${num(m.gainMarginUpperDb, 'dB')} / ${num(m.gainMarginLowerDb, 'dB')}`);
    lines.push(`  all crossovers     ${gmList.slice(0, 6).join('; ')}${gmList.length > 6 ? `; ... (${gmList.length} in all)` : ''}`);
  }
  lines.push(
    `delay margin         ${num(m.delayMarginS, 's')}`,
    `peak sensitivity     ${num(m.peakSensitivity)}${m.peakSensitivityAtRadS === null ? '' : ` at ${freq(m.peakSensitivityAtRadS)}`}`,
    `peak complementary   ${num(m.peakComplementary)}`,
    `bandwidth            ${num(m.bandwidthRadS, 'rad/s')}`,
  );
  const s = m.step;
  if (s === null) lines.push('step                 none (loop not stable, or not simulable)');
  else {
    lines.push(
      `step overshoot       ${num(s.overshootPct, '%')}   undershoot ${num(s.undershootPct, '%')}`,
      `step rise (10-90 %)  ${num(s.riseTimeS, 's')}   settling (2 %) ${num(s.settlingTimeS, 's')}   peak at ${num(s.peakTimeS, 's')}`,
      `step final value     ${num(s.finalValue)}   peak effort ${num(s.peakEffort)}`,
    );
  }
  for (const w of m.warnings) lines.push(`warning: ${w}`);
  return lines;
}

/** One batch line -> one output object (never throws); exported so the benchmark runs exactly this path. */
export function batchLine(line: string, analyse: Analyse, toJson: ToJson): Record<string, unknown> {
  let input: unknown;
  try {
    input = JSON.parse(line);
  } catch {
    return { error: 'not valid JSON; each line must be an object like {"plant": "1/(s+1)", "comp": "2"}' };
  }
  if (typeof input !== 'object' || input === null || typeof (input as { plant?: unknown }).plant !== 'string') {
    return { error: 'each line needs a "plant" string (and optionally "comp", "ideal")' };
  }
  const o = input as { plant: string; comp?: unknown; ideal?: unknown; id?: unknown };
  const id = o.id === undefined ? {} : { id: o.id };
  if (o.comp !== undefined && typeof o.comp !== 'string') return { ...id, error: '"comp" must be a string' };
  try {
    return { ...id, ...toJson(analyse(o.plant, o.comp ?? '1', { ideal: o.ideal === true })) };
  } catch (e) {
    return { ...id, error: e instanceof UserError ? e.message : `internal error: ${e instanceof Error ? e.message : String(e)}` };
  }
}

/** Reads JSON lines from FILE or stdin and writes one object per non-blank line. */
async function runBatch(file: string, ctx: CommandContext): Promise<number> {
  if (file !== '-' && !existsSync(file)) throw new UserError(`--batch: file '${file}' not found; give a JSON-lines file or - for stdin`);
  const { analyse, toJson } = await loadAnalysis();
  const input = file === '-' ? process.stdin : createReadStream(file, { encoding: 'utf8' });
  const rl = createInterface({ input, crlfDelay: Infinity });
  for await (const line of rl) {
    if (line.trim() === '') continue;
    ctx.out(JSON.stringify(batchLine(line, analyse, toJson)));
  }
  return 0;
}

/** Entry point of the command (see HELP). */
export async function run(args: string[], ctx: CommandContext): Promise<number> {
  let values: { plant?: string; comp?: string; json?: boolean; ideal?: boolean; batch?: string; help?: boolean };
  try {
    ({ values } = parseArgs({
      args,
      options: {
        plant: { type: 'string' },
        comp: { type: 'string' },
        json: { type: 'boolean' },
        ideal: { type: 'boolean' },
        batch: { type: 'string' },
        help: { type: 'boolean', short: 'h' },
      },
      strict: true,
      allowPositionals: false,
    }));
  } catch (e) {
    throw new UserError(`calc: ${argError(e)}; run 'loopledger calc --help'`);
  }
  if (values.help) {
    ctx.out(HELP);
    return 0;
  }
  if (values.batch !== undefined) {
    if (values.plant !== undefined || values.comp !== undefined) throw new UserError('calc: --batch reads plant and comp from each line; drop --plant/--comp');
    return runBatch(values.batch, ctx);
  }
  if (values.plant === undefined) throw new UserError("calc: --plant is required, e.g. --plant '400/(s*(s+20))' --comp '1'");
  const { analyse, toJson } = await loadAnalysis();
  const m = analyse(values.plant, values.comp ?? '1', { ideal: values.ideal === true });
  ctx.out(values.json ? JSON.stringify(toJson(m)) : summaryLines(m).join('\n'));
  return 0;
}
