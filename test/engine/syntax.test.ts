import { describe, expect, it } from 'vitest';
import { formatBlock, parseBlock } from '../../src/engine/block-syntax.js';
import { formatRequirement, parseRequirement } from '../../src/engine/requirement-syntax.js';
import { UserError } from '../../src/model/errors.js';
import type { TransferFunction } from '../../src/model/tf.js';

// The expression parser is tested on its own; here we only need to see that the text reaches it.
const seen: string[] = [];
const fakeExpr = (text: string): TransferFunction => {
  seen.push(text);
  return { num: [10, 1], den: [100, 1], delayS: 0 };
};
const TWO_PI = 2 * Math.PI;
const block = (t: string, unit: 'hz' | 'rad' = 'hz') => parseBlock(t, unit, fakeExpr);
const req = (t: string, unit: 'hz' | 'rad' = 'hz') => parseRequirement(t, unit);

const relErr = (a: number, b: number) => (b === 0 ? Math.abs(a) : Math.abs(a - b) / Math.abs(b));

/** The thrown error, asserting it is a one-line UserError. */
function userError(f: () => unknown): UserError {
  try {
    f();
  } catch (e) {
    expect(e).toBeInstanceOf(UserError);
    expect((e as Error).message).not.toContain('\n');
    return e as UserError;
  }
  throw new Error('expected a UserError');
}

describe('block syntax', () => {
  it('reads every block kind with frequencies in Hz converted by 2*pi', () => {
    expect(block('gain:2.5')).toEqual({ kind: 'gain', k: 2.5 });
    expect(block('int')).toEqual({ kind: 'integrator' });
    expect(block('pi:5Hz')).toEqual({ kind: 'pi', zeroRadS: 5 * TWO_PI });
    expect(block('lead:30Hz/150Hz')).toEqual({ kind: 'lead', zeroRadS: 30 * TWO_PI, poleRadS: 150 * TWO_PI });
    expect(block('lag:2Hz/0.2Hz')).toEqual({ kind: 'lag', zeroRadS: 2 * TWO_PI, poleRadS: 0.2 * TWO_PI });
    expect(block('pid:kp=1.2,ki=40,kd=0.002,filter=800Hz')).toEqual({ kind: 'pid', kp: 1.2, ki: 40, kd: 0.002, filterRadS: 800 * TWO_PI });
    expect(block('notch:420Hz,depth=20dB,q=2')).toEqual({ kind: 'notch', centerRadS: 420 * TWO_PI, depthDb: 20, q: 2 });
    expect(block('lp1:300Hz')).toEqual({ kind: 'lowpass1', cornerRadS: 300 * TWO_PI });
    expect(block('lp2:300Hz,zeta=0.5')).toEqual({ kind: 'lowpass2', cornerRadS: 300 * TWO_PI, zeta: 0.5 });
  });

  it('converts a gain in dB with 10^(dB/20)', () => {
    // -6 dB = 0.501187 (10^(-0.3), closed form).
    const b = block('gain:-6dB');
    expect(b.kind === 'gain' && b.k).toBeCloseTo(0.501187, 6);
  });

  it('takes bare numbers in the display unit and accepts rad/s and kHz suffixes', () => {
    expect(block('pi:50', 'rad')).toEqual({ kind: 'pi', zeroRadS: 50 });
    expect(block('pi:50', 'hz')).toEqual({ kind: 'pi', zeroRadS: 50 * TWO_PI });
    expect(block('lp1:1.5kHz', 'rad')).toEqual({ kind: 'lowpass1', cornerRadS: 1500 * TWO_PI });
    // The unit's own slash must not be mistaken for the zero/pole separator.
    expect(block('lead:30rad/s/150rad/s', 'hz')).toEqual({ kind: 'lead', zeroRadS: 30, poleRadS: 150 });
    expect(block('lag:20rad/s/2Hz', 'hz')).toEqual({ kind: 'lag', zeroRadS: 20, poleRadS: 2 * TWO_PI });
  });

  it('defaults lp2 damping to 1/sqrt(2) and pid filter to none (ideal derivative)', () => {
    expect(block('lp2:300Hz')).toEqual({ kind: 'lowpass2', cornerRadS: 300 * TWO_PI, zeta: Math.SQRT1_2 });
    expect(block('pid:kp=2,kd=0.01')).toEqual({ kind: 'pid', kp: 2, ki: 0, kd: 0.01, filterRadS: Infinity });
  });

  it('hands the text of an expr block to the expression parser', () => {
    const b = block('expr:(s+10)/(s+100)');
    expect(seen.at(-1)).toBe('(s+10)/(s+100)');
    expect(b).toMatchObject({ kind: 'expr', text: '(s+10)/(s+100)', tf: { num: [10, 1], den: [100, 1] } });
  });

  it('writes blocks back in a form it reads again, in either unit', () => {
    const words = ['gain:2.5', 'int', 'pi:5Hz', 'lead:30Hz/150Hz', 'lag:2Hz/0.2Hz', 'pid:kp=1.2,ki=40,kd=0.002,filter=800Hz', 'notch:420Hz,depth=20dB,q=2', 'lp1:300Hz', 'lp2:300Hz,zeta=0.5', 'pid:kp=2,ki=0,kd=0.01'];
    for (const unit of ['hz', 'rad'] as const) {
      for (const w of words) {
        const b = block(w);
        const again = block(formatBlock(b, unit), unit);
        expect(again.kind).toBe(b.kind);
        for (const [k, v] of Object.entries(b)) {
          // formatBlock writes 6 significant figures.
          if (typeof v === 'number' && Number.isFinite(v)) expect(relErr((again as Record<string, unknown>)[k] as number, v)).toBeLessThan(5e-6);
          else expect((again as Record<string, unknown>)[k]).toEqual(v);
        }
      }
    }
  });

  it('refuses bad blocks with one line that says how to write them', () => {
    expect(userError(() => block('lead:150Hz/30Hz')).message).toMatch(/zero below its pole/);
    expect(userError(() => block('lag:0.2Hz/2Hz')).message).toMatch(/pole below its zero/);
    expect(userError(() => block('lead:30Hz')).message).toMatch(/lead:ZERO\/POLE/);
    expect(userError(() => block('gain:0')).message).toMatch(/opens the loop/);
    expect(userError(() => block('gain:3Hz')).message).toMatch(/unknown unit/);
    expect(userError(() => block('int:4')).message).toMatch(/no parameter/);
    expect(userError(() => block('notch:420Hz,q=2')).message).toMatch(/depth and q/);
    expect(userError(() => block('notch:420Hz,depth=-3dB,q=2')).message).toMatch(/above 0 dB/);
    expect(userError(() => block('notch:420Hz,depth=20dB,q=2,w=3')).message).toMatch(/not one of/);
    expect(userError(() => block('pid:kp=1,kp=2')).message).toMatch(/given twice/);
    expect(userError(() => block('pid:')).message).toMatch(/at least one of kp, ki, kd/);
    expect(userError(() => block('pi:-5Hz')).message).toMatch(/above zero/);
    expect(userError(() => block('pi:5furlongs')).message).toMatch(/unknown unit|not a number/);
    expect(userError(() => block('wobble:3')).message).toMatch(/unknown block kind 'wobble'/);
    expect(userError(() => block('expr:')).message).toMatch(/expr:EXPR/);
  });
});

describe('requirement syntax', () => {
  it('stores limits in base units: deg, dB, rad/s, s, ratio, percent', () => {
    expect(req('pm>=45')).toEqual({ metric: 'pm', op: '>=', value: 45, text: 'pm>=45' });
    expect(req('gm>=6dB')).toMatchObject({ metric: 'gm', value: 6 });
    expect(req('fc>=80Hz')).toMatchObject({ metric: 'fc', op: '>=', value: 80 * TWO_PI });
    expect(req('fc<=200', 'rad')).toMatchObject({ metric: 'fc', op: '<=', value: 200 });
    expect(req('bw>=1.2kHz')).toMatchObject({ metric: 'bw', value: 1200 * TWO_PI });
    expect(req('ts<=50ms')).toMatchObject({ metric: 'ts', value: 0.05 });
    expect(req('dm>=300us')).toMatchObject({ metric: 'dm', value: 3e-4 });
    expect(req('os<=10%')).toMatchObject({ metric: 'os', value: 10 });
    expect(req('ms<=1.7')).toMatchObject({ metric: 'ms', value: 1.7 });
    expect(req('kv>=1000')).toMatchObject({ metric: 'kv', value: 1000 });
    expect(req('sep>=4')).toMatchObject({ metric: 'sep', value: 4 });
    expect(req('effort<=30')).toMatchObject({ metric: 'effort', value: 30 });
  });

  it('converts a dB limit on a ratio with 10^(dB/20)', () => {
    // 6 dB -> 1.99526 (closed form); 20 dB -> 10.
    expect(req('ms<=6dB').value).toBeCloseTo(1.99526, 5);
    expect(req('hf<=20dB').value).toBeCloseTo(10, 12);
  });

  it('turns a steady-state error limit into the equivalent error constant', () => {
    // Unity feedback, unit inputs: e_step = 1/(1+Kp), e_ramp = 1/Kv, e_parabola = 1/Ka
    // (Ogata, Modern Control Engineering, 5th ed., sec. 5-8, static error constants; from memory).
    expect(req('estep<=1%')).toMatchObject({ metric: 'kp', op: '>=', value: 1 / 0.01 - 1, text: 'estep<=1%' });
    expect(req('eramp<=0.002')).toMatchObject({ metric: 'kv', op: '>=', value: 500 });
    expect(req('eparab<=1e-4').value).toBeCloseTo(1e4, 9);
  });

  it('writes requirements back in a form it reads again', () => {
    for (const unit of ['hz', 'rad'] as const) {
      for (const t of ['pm>=45', 'gm>=6dB', 'fc>=80Hz', 'bw<=300rad/s', 'ts<=50ms', 'os<=10%', 'ms<=1.7', 'kv>=1000', 'dm>=300us', 'hf<=20dB']) {
        const r = req(t);
        const again = req(formatRequirement(r, unit), unit);
        expect(again.metric).toBe(r.metric);
        expect(again.op).toBe(r.op);
        // Limits are shown with 4 significant figures.
        expect(relErr(again.value, r.value)).toBeLessThan(5e-4);
      }
    }
  });

  it('refuses bad requirements with one line that says how to write them', () => {
    expect(userError(() => req('pm>45')).message).toMatch(/METRIC>=VALUE/);
    expect(userError(() => req('zz>=3')).message).toMatch(/unknown metric 'zz'/);
    expect(userError(() => req('pm>=45dB')).message).toMatch(/does not fit/);
    expect(userError(() => req('fc>=80ms')).message).toMatch(/unknown unit/);
    expect(userError(() => req('ts<=50Hz')).message).toMatch(/unknown unit/);
    expect(userError(() => req('estep>=1%')).message).toMatch(/upper limit/);
    expect(userError(() => req('eramp<=0')).message).toMatch(/above zero/);
    expect(userError(() => req('gm>=-3')).message).toMatch(/not be negative/);
    expect(userError(() => req('kv>=fast')).message).toMatch(/not a number/);
  });
});

describe('a requirement cut short by the shell', () => {
  it('names the quoting problem when only the metric arrives', () => {
    // `spec X/vel pm>=45` unquoted: the shell redirects to a file '=45' and passes 'pm'.
    expect(() => parseRequirement('pm', 'hz')).toThrow(UserError);
    expect(() => parseRequirement('pm', 'hz')).toThrow(/in quotes/);
  });
});
