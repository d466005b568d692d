import { describe, expect, it } from 'vitest';
import { parseTransferFunction } from '../../src/analysis/parse.js';
import { ExpressionError } from '../../src/model/errors.js';

/** The ExpressionError thrown by parsing text, or a failure when none is thrown. */
function parseError(text: string, role: 'plant' | 'compensator' = 'plant'): ExpressionError {
  try {
    parseTransferFunction(text, role);
  } catch (e) {
    expect(e).toBeInstanceOf(ExpressionError);
    return e as ExpressionError;
  }
  throw new Error(`expected '${text}' to be refused`);
}

describe('parseTransferFunction: coefficients (expanded by hand)', () => {
  it('reads a type-1 plant', () => {
    expect(parseTransferFunction('400/(s*(s+20))', 'plant')).toEqual({ num: [400], den: [0, 20, 1], delayS: 0 });
  });

  it('reads time-constant form, a resonance and one delay factor', () => {
    // 3e4 (s/150 + 1) = 3e4 + 200 s
    const tf = parseTransferFunction('3e4*(s/150+1)/(s^2+12*s+9e4)*exp(-0.0002*s)', 'plant');
    expect(tf.num[0]).toBeCloseTo(3e4, 9);
    expect(tf.num[1]).toBeCloseTo(200, 12);
    expect(tf.den).toEqual([9e4, 12, 1]);
    expect(tf.delayS).toBe(0.0002);
  });

  it('normalises the denominator to a leading coefficient of 1', () => {
    expect(parseTransferFunction('2/(4*s+1)', 'plant')).toEqual({ num: [0.5], den: [0.25, 1], delayS: 0 });
  });

  it('reads s(...) as a product, implicit products and exp(-s*T)', () => {
    expect(parseTransferFunction('1/s(s+1)', 'plant').den).toEqual([0, 1, 1]);
    expect(parseTransferFunction('2(s+1)/(s+3)^2', 'plant')).toEqual({ num: [2, 2], den: [9, 6, 1], delayS: 0 });
    expect(parseTransferFunction('exp(-s*0.5)/(s+1)', 'plant').delayS).toBe(0.5);
  });

  it('keeps a shared denominator once in a sum and accepts pi', () => {
    expect(parseTransferFunction('1/(s+1) + 2/(s+1)', 'plant')).toEqual({ num: [3], den: [1, 1], delayS: 0 });
    expect(parseTransferFunction('2*pi*10/(s+2*pi*10)', 'plant').num[0]).toBeCloseTo(20 * Math.PI, 12);
  });

  it('expands order 40 exactly: the middle coefficient of (s+1)^40 is C(40,20) = 137846528820', () => {
    const tf = parseTransferFunction('1/(s+1)^40', 'plant');
    expect(tf.den).toHaveLength(41);
    expect(tf.den[20]).toBe(137846528820);
    expect(tf.den[1]).toBe(40);
  });

  it('allows an improper compensator (the caller decides) but not an improper plant', () => {
    expect(parseTransferFunction('2*(s+1)', 'compensator')).toEqual({ num: [2, 2], den: [1], delayS: 0 });
    expect(parseError('s^2/(s+1)').message).toMatch(/improper/);
  });
});

describe('parseTransferFunction: every kind of bad input is an ExpressionError', () => {
  it('syntax error, with the column mathjs reports', () => {
    const e = parseError('(s+1');
    expect(e.message).toMatch(/syntax error/);
    expect(e.column).toBe(5);
    expect(parseError('s +* 2').column).toBe(4);
  });

  it('empty text', () => {
    expect(parseError('   ').message).toMatch(/empty/);
  });

  it('unknown symbols and functions, pointing at them', () => {
    const e = parseError('400/(s*(s+k))');
    expect(e.message).toMatch(/unknown symbol 'k'/);
    expect(e.column).toBe(11);
    expect(parseError('2 Hz').column).toBe(3);
    expect(parseError('sin(s)/(s+1)').message).toMatch(/unknown function 'sin'/);
  });

  it('division by a zero polynomial', () => {
    const e = parseError('1/(s-s)');
    expect(e.message).toMatch(/division by a zero polynomial/);
    expect(e.column).toBe(4);
    expect(parseError('1/(1/(s+1)-1/(s+1))').message).toMatch(/zero polynomial/);
  });

  it('more than one delay', () => {
    expect(parseError('exp(-s)*exp(-2*s)/(s+1)').message).toMatch(/more than one delay/);
    expect(parseError('exp(-s)^2/(s+1)').message).toMatch(/more than one delay/);
  });

  it('a delay with a positive exponent, also when hidden in a denominator', () => {
    expect(parseError('exp(0.1*s)/(s+1)').message).toMatch(/positive exponent/);
    expect(parseError('1/(exp(-0.1*s)*(s+1))').message).toMatch(/positive exponent/);
  });

  it('a delay that is not a factor, or not linear in s', () => {
    expect(parseError('1/(s+1) + exp(-s)').message).toMatch(/multiply the whole model/);
    expect(parseError('exp(-s^2)/(s+1)').message).toMatch(/-T\*s/);
  });

  it('non-finite numbers', () => {
    expect(parseError('1e999/(s+1)').message).toMatch(/out of range/);
    expect(parseError('Infinity/(s+1)').message).toMatch(/out of range/);
    expect(parseError('(1e200*s+1)^3/(s+1)^3').message).toMatch(/overflow/);
  });

  it('powers that are not whole numbers >= 0', () => {
    expect(parseError('s^-1').message).toMatch(/whole number/);
    expect(parseError('1/(s+1)^0.5').message).toMatch(/whole number/);
    expect(parseError('1/(s+1)^s').message).toMatch(/plain number/);
  });

  it('constructs outside the model syntax', () => {
    for (const t of ['[1, 2]', 'a = 2', 's > 2', 's!', '"s"', 'true']) expect(parseError(t)).toBeInstanceOf(ExpressionError);
  });
});
