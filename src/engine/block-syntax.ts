import type { Block } from '../model/blocks.js';
import { UserError } from '../model/errors.js';
import type { TransferFunction } from '../model/tf.js';
import { formatFrequency, formatNumber, parseFrequencyRadS, splitNumberSuffix, type FreqUnit } from '../model/units.js';

/**
 * The short block syntax of `comp set`, one block per word:
 *   gain:2.5  gain:-6dB  int  pi:5Hz  lead:30Hz/150Hz  lag:2Hz/0.2Hz
 *   pid:kp=1.2,ki=40,kd=0.002,filter=800Hz  notch:420Hz,depth=20dB,q=2
 *   lp1:300Hz  lp2:300Hz,zeta=0.7  expr:(s+10)/(s+100)
 * Bare frequencies are in the store's display unit.
 */
export const BLOCK_SYNTAX_HELP =
  'blocks: gain:K|gain:XdB, int, pi:FZERO, lead:FZERO/FPOLE, lag:FZERO/FPOLE, pid:kp=..,ki=..,kd=..[,filter=F], notch:F,depth=XdB,q=Q, lp1:F, lp2:F[,zeta=Z], expr:EXPR';

type ExprParser = (text: string) => TransferFunction;

/** Parses one block word; errors name the block and say how to write it. */
export function parseBlock(text: string, unit: FreqUnit, parseExpr: ExprParser): Block {
  const colon = text.indexOf(':');
  const kind = (colon < 0 ? text : text.slice(0, colon)).trim().toLowerCase();
  const arg = colon < 0 ? '' : text.slice(colon + 1).trim();
  const where = `block '${text}'`;
  const need = (ok: boolean, how: string) => {
    if (!ok) throw new UserError(`${where}: ${how}`);
  };
  const freq = (t: string, name: string) => parseFrequencyRadS(t, unit, `${where}, ${name}`);
  switch (kind) {
    case 'gain':
    case 'k': {
      need(arg !== '', 'write gain:2.5 or gain:-6dB');
      const { value, suffix } = splitNumberSuffix(arg, where);
      need(suffix === '' || suffix === 'db', `unknown unit '${suffix}'; write gain:2.5 or gain:-6dB`);
      const k = suffix === 'db' ? 10 ** (value / 20) : value;
      need(k !== 0, 'a zero gain opens the loop; remove the block or give a non-zero gain');
      return { kind: 'gain', k };
    }
    case 'int':
    case 'integrator':
      need(arg === '', "an integrator takes no parameter; write 'int'");
      return { kind: 'integrator' };
    case 'pi':
      need(arg !== '', 'write pi:5Hz (the frequency of the PI zero)');
      return { kind: 'pi', zeroRadS: freq(arg, 'zero') };
    case 'lead':
    case 'lag': {
      // Split only at a '/' that starts the second number, so 'lead:30rad/s/150rad/s' works too.
      const parts = arg.split(/\/(?=\s*[+-]?[\d.])/);
      need(parts.length === 2, `write ${kind}:ZERO/POLE, e.g. ${kind === 'lead' ? 'lead:30Hz/150Hz' : 'lag:2Hz/0.2Hz'}`);
      const zeroRadS = freq(parts[0]!, 'zero');
      const poleRadS = freq(parts[1]!, 'pole');
      if (kind === 'lead') need(zeroRadS < poleRadS, 'a lead needs its zero below its pole (lead:30Hz/150Hz)');
      else need(poleRadS < zeroRadS, 'a lag needs its pole below its zero (lag:2Hz/0.2Hz)');
      return { kind, zeroRadS, poleRadS };
    }
    case 'pid': {
      const kv = keyValues(arg, where, ['kp', 'ki', 'kd', 'filter']);
      const num = (k: string) => (kv[k] === undefined ? 0 : splitPlain(kv[k]!, `${where}, ${k}`));
      const kp = num('kp');
      const ki = num('ki');
      const kd = num('kd');
      need(kp !== 0 || ki !== 0 || kd !== 0, 'give at least one of kp, ki, kd (pid:kp=1,ki=20,kd=0.01,filter=500Hz)');
      const filterRadS = kv.filter === undefined ? Infinity : freq(kv.filter, 'filter');
      return { kind: 'pid', kp, ki, kd, filterRadS };
    }
    case 'notch': {
      const [centre, ...rest] = arg.split(',');
      need(centre !== undefined && centre.trim() !== '' && !centre.includes('='), 'write notch:420Hz,depth=20dB,q=2');
      const kv = keyValues(rest.join(','), where, ['depth', 'q']);
      need(kv.depth !== undefined && kv.q !== undefined, 'a notch needs depth and q: notch:420Hz,depth=20dB,q=2');
      const d = splitNumberSuffix(kv.depth!, `${where}, depth`);
      need(d.suffix === '' || d.suffix === 'db', 'depth is in dB (depth=20dB)');
      need(d.value > 0, 'depth must be above 0 dB');
      const q = splitPlain(kv.q!, `${where}, q`);
      need(q > 0, 'q must be above 0');
      return { kind: 'notch', centerRadS: freq(centre!.trim(), 'centre'), depthDb: d.value, q };
    }
    case 'lp1':
      need(arg !== '' && !arg.includes(','), 'write lp1:300Hz (the corner frequency)');
      return { kind: 'lowpass1', cornerRadS: freq(arg, 'corner') };
    case 'lp2': {
      const [corner, ...rest] = arg.split(',');
      need(corner !== undefined && corner.trim() !== '', 'write lp2:300Hz,zeta=0.7');
      const kv = keyValues(rest.join(','), where, ['zeta']);
      const zeta = kv.zeta === undefined ? Math.SQRT1_2 : splitPlain(kv.zeta, `${where}, zeta`);
      need(zeta > 0, 'zeta must be above 0');
      return { kind: 'lowpass2', cornerRadS: freq(corner!.trim(), 'corner'), zeta };
    }
    case 'expr':
      need(arg !== '', 'write expr:EXPR, e.g. expr:(s+10)/(s+100)');
      return { kind: 'expr', text: arg, tf: parseExpr(arg) };
    default:
      throw new UserError(`${where}: unknown block kind '${kind}'; ${BLOCK_SYNTAX_HELP}`);
  }
}

/** A plain number (no unit). */
function splitPlain(text: string, what: string): number {
  const { value, suffix } = splitNumberSuffix(text, what);
  if (suffix !== '') throw new UserError(`${what}: '${text}' takes a plain number, without a unit`);
  return value;
}

/** "a=1,b=2" into a record; unknown or repeated keys are errors. */
function keyValues(text: string, where: string, allowed: string[]): Record<string, string> {
  const out: Record<string, string> = {};
  if (text.trim() === '') return out;
  for (const part of text.split(',')) {
    const eq = part.indexOf('=');
    const key = part.slice(0, eq).trim().toLowerCase();
    if (eq < 0 || !allowed.includes(key)) {
      throw new UserError(`${where}: '${part.trim()}' is not one of ${allowed.map((a) => a + '=').join(', ')}`);
    }
    if (out[key] !== undefined) throw new UserError(`${where}: ${key} is given twice`);
    out[key] = part.slice(eq + 1).trim();
  }
  return out;
}

/** The canonical text of a block, re-readable by parseBlock in the same unit. */
export function formatBlock(b: Block, unit: FreqUnit): string {
  const f = (w: number) => formatFrequency(w, unit, 6);
  const n = (x: number) => formatNumber(x, 6);
  switch (b.kind) {
    case 'gain': return `gain:${n(b.k)}`;
    case 'integrator': return 'int';
    case 'pi': return `pi:${f(b.zeroRadS)}`;
    case 'lead':
    case 'lag': return `${b.kind}:${f(b.zeroRadS)}/${f(b.poleRadS)}`;
    case 'pid': {
      const parts = [`kp=${n(b.kp)}`, `ki=${n(b.ki)}`, `kd=${n(b.kd)}`];
      if (Number.isFinite(b.filterRadS)) parts.push(`filter=${f(b.filterRadS)}`);
      return `pid:${parts.join(',')}`;
    }
    case 'notch': return `notch:${f(b.centerRadS)},depth=${n(b.depthDb)}dB,q=${n(b.q)}`;
    case 'lowpass1': return `lp1:${f(b.cornerRadS)}`;
    case 'lowpass2': return `lp2:${f(b.cornerRadS)},zeta=${n(b.zeta)}`;
    case 'expr': return `expr:${b.text}`;
  }
}
