import { describe, expect, it } from 'vitest';
import { closedLoopDcGain, errorConstants } from '../../src/analysis/error-constants.js';
import type { TransferFunction } from '../../src/model/tf.js';

// Static error constants (Ogata, Modern Control Engineering, 5th ed., Sec. 5-8, from memory):
// Kp = lim L(s), Kv = lim s L(s), Ka = lim s^2 L(s) as s -> 0; the type is the number of integrators.
const tf = (num: number[], den: number[]): TransferFunction => ({ num, den, delayS: 0 });

describe('errorConstants', () => {
  it('type 0: Kp = L(0), Kv = Ka = 0', () => {
    expect(errorConstants(tf([20], [2, 1]))).toEqual({ systemType: 0, kp: 10, kv: 0, ka: 0 });
  });

  it('type 1: Kp = inf, Kv = K a/b for K(s+a)/(s(s+b))', () => {
    expect(errorConstants(tf([6, 3], [0, 4, 1]))).toEqual({ systemType: 1, kp: Infinity, kv: 1.5, ka: 0 });
  });

  it('type 2: Ka = 2K/5 for K(s+2)/(s^2(s+5)), with the sign kept', () => {
    expect(errorConstants(tf([14, 7], [0, 0, 5, 1]))).toEqual({ systemType: 2, kp: Infinity, kv: Infinity, ka: 2.8 });
    expect(errorConstants(tf([-14, -7], [0, 0, 5, 1]))).toEqual({ systemType: 2, kp: -Infinity, kv: -Infinity, ka: -2.8 });
  });

  it('a zero at the origin cancels an integrator in the count (nothing else is cancelled)', () => {
    expect(errorConstants(tf([0, 3], [0, 0, 1, 1]))).toEqual({ systemType: 1, kp: Infinity, kv: 3, ka: 0 });
    expect(errorConstants(tf([0, 3], [1, 1]))).toEqual({ systemType: 0, kp: 0, kv: 0, ka: 0 });
  });

  it('a zero loop has type 0 and all constants 0', () => {
    expect(errorConstants(tf([0], [1, 1]))).toEqual({ systemType: 0, kp: 0, kv: 0, ka: 0 });
  });
});

describe('closedLoopDcGain: T(0) = lim N/(D + N)', () => {
  it('Kp/(1 + Kp) for type 0 and exactly 1 with an integrator', () => {
    expect(closedLoopDcGain(tf([20], [2, 1]))).toBeCloseTo(10 / 11, 15);
    expect(closedLoopDcGain(tf([400], [0, 20, 1]))).toBe(1);
  });

  it('0 with a differentiating loop, and infinite when the closed loop has a pole at 0', () => {
    expect(closedLoopDcGain(tf([0, 1], [1, 1]))).toBe(0);
    expect(closedLoopDcGain(tf([-1], [1, 1]))).toBe(-Infinity);
  });
});
