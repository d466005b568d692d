import type { Block } from '../model/blocks.js';
import { UserError } from '../model/errors.js';
import type { MetricKey, Requirement } from '../model/requirements.js';
import { DUMP_FORMAT, DUMP_FORMAT_VERSION, type MachineDump } from './dump.js';
import { checkBlock } from './inputs.js';
import { checkName } from './names.js';
import type { LoopState } from './types.js';

/**
 * Checks that a parsed dump has the shape `dump` writes, so `load` either
 * reproduces a machine exactly or refuses with the path of the first problem.
 */

const METRICS: readonly MetricKey[] = ['pm', 'gm', 'fc', 'bw', 'ms', 'mt', 'dm', 'os', 'tr', 'ts', 'kp', 'kv', 'ka', 'effort', 'hf', 'sep'];
const KINDS = ['create', 'plant', 'spec', 'comp', 'revert', 'edit'];

type Obj = Record<string, unknown>;

function fail(where: string, what: string): never {
  throw new UserError(`dump: ${where}: ${what}; the file was not loaded`);
}

function obj(v: unknown, where: string): Obj {
  if (v === null || typeof v !== 'object' || Array.isArray(v)) fail(where, 'expected an object');
  return v as Obj;
}

function arr(v: unknown, where: string): unknown[] {
  if (!Array.isArray(v)) fail(where, 'expected a list');
  return v;
}

function str(v: unknown, where: string): string {
  if (typeof v !== 'string') fail(where, 'expected text');
  return v;
}

function num(v: unknown, where: string): number {
  if (typeof v !== 'number' || Number.isNaN(v)) fail(where, 'expected a number');
  return v;
}

function coeffs(v: unknown, where: string): number[] {
  const a = arr(v, where).map((x, i) => num(x, `${where}[${i}]`));
  if (a.length === 0 || !a.every(Number.isFinite)) fail(where, 'expected a non-empty list of finite coefficients');
  return a;
}

function checkState(v: unknown, where: string): LoopState {
  const s = obj(v, where);
  const plants = obj(s.plants, `${where}.plants`);
  if (Object.keys(plants).length === 0) fail(`${where}.plants`, 'a loop needs at least one plant variant');
  for (const [name, p] of Object.entries(plants)) {
    const w = `${where}.plants.${name}`;
    checkName(name, 'variant');
    const pv = obj(p, w);
    str(pv.text, `${w}.text`);
    const tf = obj(pv.tf, `${w}.tf`);
    coeffs(tf.num, `${w}.tf.num`);
    if (coeffs(tf.den, `${w}.tf.den`).every((c) => c === 0)) fail(`${w}.tf.den`, 'the denominator is zero');
    const d = num(tf.delayS, `${w}.tf.delayS`);
    if (!(d >= 0 && Number.isFinite(d))) fail(`${w}.tf.delayS`, 'the delay must be finite and not negative');
  }
  arr(s.requirements, `${where}.requirements`).forEach((r, i) => {
    const w = `${where}.requirements[${i}]`;
    const q = obj(r, w) as Partial<Requirement>;
    if (!METRICS.includes(q.metric as MetricKey)) fail(`${w}.metric`, `unknown metric '${String(q.metric)}'`);
    if (q.op !== '>=' && q.op !== '<=') fail(`${w}.op`, 'expected >= or <=');
    if (!Number.isFinite(num(q.value, `${w}.value`))) fail(`${w}.value`, 'expected a finite limit');
    str(q.text, `${w}.text`);
  });
  const comp = obj(s.compensator, `${where}.compensator`);
  arr(comp.blocks, `${where}.compensator.blocks`).forEach((b, i) => {
    const w = `${where}.compensator.blocks[${i}]`;
    const blk = obj(b, w);
    if (blk.kind === 'expr') {
      str(blk.text, `${w}.text`);
      const tf = obj(blk.tf, `${w}.tf`);
      coeffs(tf.num, `${w}.tf.num`);
      coeffs(tf.den, `${w}.tf.den`);
      num(tf.delayS, `${w}.tf.delayS`);
    }
    try {
      checkBlock(blk as unknown as Block);
    } catch (e) {
      fail(w, e instanceof Error ? e.message : String(e));
    }
  });
  if (comp.ideal !== undefined && typeof comp.ideal !== 'boolean') fail(`${where}.compensator.ideal`, 'expected true or false');
  return s as unknown as LoopState;
}

/** The dump's shape, checked; throws UserError naming the first problem. */
export function checkDump(v: unknown): MachineDump {
  const d = obj(v, 'top level');
  if (d.format !== DUMP_FORMAT) fail('format', `expected "${DUMP_FORMAT}"; this is not a loopledger dump`);
  const version = num(d.formatVersion, 'formatVersion');
  if (version > DUMP_FORMAT_VERSION) fail('formatVersion', `version ${version} was written by a newer loopledger (this one reads up to ${DUMP_FORMAT_VERSION}); upgrade loopledger`);
  if (version !== DUMP_FORMAT_VERSION) fail('formatVersion', `unknown version ${version}`);
  const m = obj(d.machine, 'machine');
  str(m.name, 'machine.name');
  str(m.createdAt, 'machine.createdAt');
  if (m.unit !== 'hz' && m.unit !== 'rad') fail('machine.unit', 'expected "hz" or "rad"');
  const axisNames = new Set<string>();
  arr(d.axes, 'axes').forEach((a, i) => {
    const w = `axes[${i}]`;
    const ax = obj(a, w);
    const name = checkName(str(ax.name, `${w}.name`), 'axis');
    if (axisNames.has(name)) fail(`${w}.name`, `axis '${name}' appears twice`);
    axisNames.add(name);
    for (const k of ['note', 'author', 'createdAt']) str(ax[k], `${w}.${k}`);
    const loops = arr(ax.loops, `${w}.loops`).map((l, j) => obj(l, `${w}.loops[${j}]`));
    const loopNames = loops.map((l, j) => checkName(str(l.name, `${w}.loops[${j}].name`), 'loop'));
    loops.forEach((l, j) => {
      const lw = `${name}/${loopNames[j]}`;
      if (loopNames.indexOf(loopNames[j]!) !== j) fail(lw, 'loop appears twice');
      if (l.inner !== null && !loopNames.includes(str(l.inner, `${lw}.inner`))) fail(`${lw}.inner`, `no loop '${String(l.inner)}' on axis ${name}`);
      if (l.sampleRateHz !== null && !(num(l.sampleRateHz, `${lw}.sampleRateHz`) > 0)) fail(`${lw}.sampleRateHz`, 'expected a rate above zero or null');
      const revs = arr(l.revisions, `${lw}.revisions`);
      if (revs.length === 0) fail(`${lw}.revisions`, 'a loop has at least one revision');
      revs.forEach((r, k) => {
        const rw = `${lw} revision ${k + 1}`;
        const rv = obj(r, rw);
        if (rv.number !== k + 1) fail(`${rw}.number`, `expected ${k + 1} (revisions are numbered 1, 2, 3 ... in order)`);
        const okParent = k === 0 ? rv.parent === null : Number.isInteger(rv.parent) && (rv.parent as number) >= 1 && (rv.parent as number) <= k;
        if (!okParent) fail(`${rw}.parent`, k === 0 ? 'the first revision has no parent (null)' : `expected an earlier revision number`);
        if (!KINDS.includes(rv.kind as string)) fail(`${rw}.kind`, `expected one of ${KINDS.join(', ')}`);
        for (const key of ['author', 'time', 'note', 'summary']) str(rv[key], `${rw}.${key}`);
        checkState(rv.state, `${rw}.state`);
      });
    });
    // Inner links must not form a circle.
    for (const l of loops) {
      let x: unknown = l.inner;
      for (let n = 0; x !== null; n++) {
        if (n > loops.length) fail(`${name}/${String(l.name)}.inner`, 'inner loops form a circle');
        x = loops.find((o) => o.name === x)!.inner;
      }
    }
  });
  return d as unknown as MachineDump;
}
