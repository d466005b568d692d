import type { LoopMetrics, StepMetrics } from '../model/metrics.js';
import type { MetricKey } from '../model/requirements.js';
import type { ResultRow } from '../store/rows.js';
import type { LoopResult } from './types.js';

/**
 * Reading a cached result back. A stored result is only a cache of what a
 * revision implies, and the store may have been written by an older build
 * (another layout, infinities as strings, fields since renamed). Anything that
 * is not exactly the shape this build writes is treated as stale (analysed
 * again), never handed to a face that would trip over it.
 */

type Field = 'bool' | 'num' | 'num?' | 'nums' | 'poles' | 'step?' | 'strings';

// Keyed by every member of LoopMetrics: a new metric does not compile until it is listed here
// (and a new metric changes analysis output: bump ANALYSIS_VERSION in graph.ts with it).
const METRIC_FIELDS: Record<keyof LoopMetrics, Field> = {
  stable: 'bool', closedLoopPoles: 'poles', closedLoopDcGain: 'num', systemType: 'num', kp: 'num', kv: 'num', ka: 'num',
  gainCrossoversRadS: 'nums', phaseMarginsDeg: 'nums', phaseMarginDeg: 'num?', phaseMarginAtRadS: 'num?',
  phaseCrossoversRadS: 'nums', gainMarginsDb: 'nums', gainMarginDb: 'num?', gainMarginAtRadS: 'num?',
  gainMarginUpperDb: 'num?', gainMarginLowerDb: 'num?', delayMarginS: 'num?', peakSensitivity: 'num',
  peakSensitivityAtRadS: 'num?', peakComplementary: 'num', bandwidthRadS: 'num?', step: 'step?', warnings: 'strings',
};

const STEP_FIELDS: Record<keyof StepMetrics, 'num' | 'num?'> = {
  overshootPct: 'num', undershootPct: 'num', riseTimeS: 'num?', settlingTimeS: 'num?', peakTimeS: 'num?', finalValue: 'num', peakEffort: 'num',
};

// As lists, so that checking a row allocates nothing (check reads every loop's row).
const METRIC_LIST = Object.entries(METRIC_FIELDS) as readonly [string, Field][];
const STEP_LIST = Object.entries(STEP_FIELDS) as readonly [string, Field][];

const METRIC_KEYS: readonly MetricKey[] = ['pm', 'gm', 'fc', 'bw', 'ms', 'mt', 'dm', 'os', 'tr', 'ts', 'kp', 'kv', 'ka', 'effort', 'hf', 'sep'];
const STATUSES = ['pass', 'fail', 'unstable', 'error'];

type Obj = Record<string, unknown>;

const isObj = (v: unknown): v is Obj => typeof v === 'object' && v !== null && !Array.isArray(v);
// JSON.parse never yields NaN; the stored form writes infinities as 1e999, read back as numbers.
const isNum = (v: unknown): v is number => typeof v === 'number' && !Number.isNaN(v);
const isStr = (v: unknown): v is string => typeof v === 'string';
function every(v: unknown, ok: (x: unknown) => boolean): boolean {
  if (!Array.isArray(v)) return false;
  for (const x of v) if (!ok(x)) return false;
  return true;
}

function fieldsOk(o: Obj, fields: readonly [string, Field][]): boolean {
  for (const [k, f] of fields) if (!fieldOk(f, o[k])) return false;
  return true;
}

const isPole = (p: unknown): boolean => isObj(p) && isNum(p.re) && isNum(p.im);

function fieldOk(kind: Field, v: unknown): boolean {
  switch (kind) {
    case 'bool': return typeof v === 'boolean';
    case 'num': return isNum(v);
    case 'num?': return v === null || isNum(v);
    case 'nums': return every(v, isNum);
    case 'strings': return every(v, isStr);
    case 'poles': return every(v, isPole);
    case 'step?': return v === null || (isObj(v) && fieldsOk(v, STEP_LIST));
  }
}

function metricsOk(m: unknown): boolean {
  return isObj(m) && fieldsOk(m, METRIC_LIST);
}

function requirementResultOk(r: unknown): boolean {
  if (!isObj(r) || !isObj(r.requirement)) return false;
  const q = r.requirement;
  return METRIC_KEYS.includes(q.metric as MetricKey) && (q.op === '>=' || q.op === '<=') && isNum(q.value) && isStr(q.text)
    && isStr(r.variant) && (r.value === null || isNum(r.value)) && typeof r.pass === 'boolean' && (r.reason === undefined || isStr(r.reason));
}

function variantOk(v: unknown): boolean {
  return isObj(v) && isStr(v.variant) && STATUSES.includes(v.status as string)
    && (v.metrics === null || metricsOk(v.metrics)) && (v.error === undefined || isStr(v.error))
    && every(v.requirements, requirementResultOk) && every(v.warnings, isStr);
}

/** True when `v` has exactly the shape of a LoopResult as this build writes it. */
export function isLoopResult(v: unknown): v is LoopResult {
  return isObj(v) && isStr(v.loop) && isNum(v.revision) && STATUSES.includes(v.status as string) && isStr(v.summary)
    && every(v.variants, variantOk) && (v.variants as unknown[]).length > 0 && every(v.failures, requirementResultOk)
    && isStr(v.inputHash) && isStr(v.computedAt);
}

/**
 * The result held by a stored row, or null when it cannot be trusted: not
 * JSON, another shape, or keyed differently from the row it sits in.
 */
export function readStoredResult(row: ResultRow): LoopResult | null {
  let v: unknown;
  try {
    v = JSON.parse(row.result_json);
  } catch {
    return null;
  }
  if (!isLoopResult(v)) return null;
  if (v.revision !== row.revision || v.inputHash !== row.input_hash || v.status !== row.status) return null;
  return v;
}
