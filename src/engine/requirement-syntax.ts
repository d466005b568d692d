import { UserError } from '../model/errors.js';
import type { Comparison, MetricKey, Requirement } from '../model/requirements.js';
import { formatFrequency, formatNumber, formatTime, parseFrequencyRadS, parseTimeS, splitNumberSuffix, type FreqUnit } from '../model/units.js';

/**
 * The short requirement syntax of `spec`: METRIC OP VALUE[UNIT], no spaces needed.
 *   pm>=45  gm>=6dB  fc>=80Hz  fc<=200Hz  bw>=20Hz  ms<=1.7  mt<=1.3  dm>=1ms
 *   os<=10%  tr<=5ms  ts<=50ms  kp>=50  kv>=1000  ka>=2e4  effort<=30  hf<=20dB  sep>=4
 *   estep<=1%  eramp<=1e-3  eparab<=1e-4   (steady-state error to a unit step/ramp/parabola,
 *   stored as the equivalent minimum Kp/Kv/Ka)
 */
export const REQUIREMENT_SYNTAX_HELP =
  'requirements: pm>=DEG gm>=DB fc>=F fc<=F bw>=F bw<=F ms<=X mt<=X dm>=T os<=PCT% tr<=T ts<=T kp>=X kv>=X ka>=X estep<=X eramp<=X eparab<=X effort<=X hf<=X|XdB sep>=X';

type Kind = 'deg' | 'db' | 'freq' | 'ratio' | 'time' | 'pct' | 'plain';

const METRICS: Record<MetricKey, { kind: Kind; name: string }> = {
  pm: { kind: 'deg', name: 'phase margin' },
  gm: { kind: 'db', name: 'gain margin' },
  fc: { kind: 'freq', name: 'gain crossover' },
  bw: { kind: 'freq', name: 'closed-loop bandwidth' },
  ms: { kind: 'ratio', name: 'peak sensitivity' },
  mt: { kind: 'ratio', name: 'peak complementary sensitivity' },
  dm: { kind: 'time', name: 'delay margin' },
  os: { kind: 'pct', name: 'overshoot' },
  tr: { kind: 'time', name: 'rise time' },
  ts: { kind: 'time', name: 'settling time' },
  kp: { kind: 'plain', name: 'position error constant' },
  kv: { kind: 'plain', name: 'velocity error constant' },
  ka: { kind: 'plain', name: 'acceleration error constant' },
  effort: { kind: 'plain', name: 'peak effort per unit step' },
  hf: { kind: 'ratio', name: 'high-frequency compensator gain' },
  sep: { kind: 'plain', name: 'bandwidth separation from the inner loop' },
};

/** Human name of a metric ("phase margin"). */
export function metricName(m: MetricKey): string {
  return METRICS[m].name;
}

/** Parses one requirement word; the error says how to write it. */
export function parseRequirement(text: string, unit: FreqUnit): Requirement {
  if (/^\s*[a-z]+\s*$/i.test(text)) {
    // Unquoted in a shell, pm>=45 reaches us as 'pm' (the shell took '>' as a redirect).
    throw new UserError(`requirement '${text.trim()}' has no limit; write it as '${text.trim()}>=VALUE' in quotes (unquoted, the shell reads > and < as redirects)`);
  }
  const m = /^\s*([a-z]+)\s*(>=|<=)\s*(.+?)\s*$/i.exec(text);
  if (!m) throw new UserError(`requirement '${text}': write METRIC>=VALUE or METRIC<=VALUE, e.g. pm>=45; ${REQUIREMENT_SYNTAX_HELP}`);
  const key = m[1]!.toLowerCase();
  const op = m[2] as Comparison;
  const raw = m[3]!;
  const where = `requirement '${text}'`;
  const error = ERROR_KEYS[key];
  if (error) {
    if (op !== '<=') throw new UserError(`${where}: a steady-state error takes an upper limit, e.g. ${key}<=0.01`);
    const { value, suffix } = splitNumberSuffix(raw, where);
    if (suffix !== '' && suffix !== '%') throw new UserError(`${where}: write the error as a number or a percentage`);
    const e = suffix === '%' ? value / 100 : value;
    if (!(e > 0)) throw new UserError(`${where}: the error limit must be above zero`);
    // e_step = 1/(1+Kp); e_ramp = 1/Kv; e_parabola = 1/Ka (unit inputs, unity feedback).
    const limit = key === 'estep' ? 1 / e - 1 : 1 / e;
    return { metric: error, op: '>=', value: limit, text: `${key}<=${raw}` };
  }
  if (!(key in METRICS)) throw new UserError(`${where}: unknown metric '${key}'; ${REQUIREMENT_SYNTAX_HELP}`);
  const metric = key as MetricKey;
  const value = parseValue(METRICS[metric].kind, raw, unit, where);
  // Every metric is judged as a non-negative quantity (|PM|, |GM|, ratios, times), so a negative limit is a typo.
  if (value < 0) throw new UserError(`${where}: the limit must not be negative`);
  return { metric, op, value, text: `${metric}${op}${raw}` };
}

const ERROR_KEYS: Record<string, MetricKey> = { estep: 'kp', eramp: 'kv', eparab: 'ka' };

/**
 * The requirement key a `--drop` word means, lower-cased: a steady-state error
 * ("estep", "eramp<=") is stored as its error constant's minimum, so it means
 * "kp>=", "kv>=" or "ka>="; any other word is itself ("pm", "fc<=").
 */
export function dropKey(word: string): string {
  const k = word.trim().toLowerCase();
  const m = /^([a-z]+)(<=)?$/.exec(k);
  const metric = m ? ERROR_KEYS[m[1]!] : undefined;
  return metric === undefined ? k : `${metric}>=`;
}

/** Reads a limit in the metric's base unit. */
function parseValue(kind: Kind, raw: string, unit: FreqUnit, where: string): number {
  if (kind === 'freq') return parseFrequencyRadS(raw, unit, where);
  if (kind === 'time') return parseTimeS(raw, where);
  const { value, suffix } = splitNumberSuffix(raw, where);
  const allowed: Record<Kind, string[]> = {
    deg: ['', 'deg'], db: ['', 'db'], pct: ['', '%'], ratio: ['', 'db'], plain: [''], freq: [], time: [],
  };
  if (!allowed[kind].includes(suffix)) {
    throw new UserError(`${where}: unit '${suffix}' does not fit; use ${allowed[kind].filter(Boolean).join(' or ') || 'a plain number'}`);
  }
  if (kind === 'ratio' && suffix === 'db') return 10 ** (value / 20);
  return value;
}

/** The limit as a short display string in the store's unit ("45deg", "80Hz", "50ms"). */
export function formatLimit(r: Requirement, unit: FreqUnit): string {
  return formatMetricValue(r.metric, r.value, unit);
}

/** A metric value with its unit for display. */
export function formatMetricValue(metric: MetricKey, value: number | null, unit: FreqUnit): string {
  if (value === null) return '-';
  switch (METRICS[metric].kind) {
    case 'deg': return formatNumber(value, 3) + 'deg';
    case 'db': return formatNumber(value, 3) + 'dB';
    case 'freq': return Number.isFinite(value) ? formatFrequency(value, unit, 4) : formatNumber(value);
    case 'time': return formatTime(value);
    case 'pct': return formatNumber(value, 3) + '%';
    default: return formatNumber(value, 4);
  }
}

/** The requirement as `spec` would accept it in the given unit (canonical form). */
export function formatRequirement(r: Requirement, unit: FreqUnit): string {
  return `${r.metric}${r.op}${formatLimit(r, unit)}`;
}
