import { ExpressionError } from '../model/errors.js';
import type { TransferFunction } from '../model/tf.js';
import { polyAdd, polyDegree, polyIsZero, polyMul, polyPow, polyScale, polyTrim } from './poly.js';
import { leafColumns, type ExprNode } from './parse-columns.js';
import { buildMathjsParser } from './parse-mathjs.js';

/**
 * Expression text -> transfer function. mathjs only tokenises and builds the tree;
 * we walk it with polynomial arithmetic on (numerator, denominator) pairs, because
 * symbolic simplification is slow on products of many factors and keeps float noise.
 * mathjs is reached only through this module (via parse-mathjs.ts), so code that
 * analyses stored coefficients never loads it.
 */

/** Highest polynomial order we accept while building an expression (well above any servo model). */
export const MAX_ORDER = 100;

type Role = 'plant' | 'compensator';

interface Rational {
  num: number[];
  den: number[];
  /** Pure delay in seconds, or null when this subexpression holds none. */
  delayS: number | null;
}

let mathParse: ((text: string) => ExprNode) | null = null;

/** The mathjs parser, built on first use. */
function parser(): (text: string) => ExprNode {
  mathParse ??= buildMathjsParser();
  return mathParse;
}

const EXAMPLE = 'e.g. 400/(s*(s+20))';

class Walker {
  private readonly cols: Map<ExprNode, number>;
  constructor(private readonly role: Role, text: string, root: ExprNode) {
    this.cols = leafColumns(text, root);
  }

  fail(msg: string, node: ExprNode | null): never {
    throw new ExpressionError(`${this.role}: ${msg}`, node === null ? null : (this.cols.get(node) ?? null));
  }

  constant(v: number, node: ExprNode): Rational {
    if (!Number.isFinite(v)) this.fail('number out of range; use magnitudes below 1e308', node);
    return { num: [v], den: [1], delayS: null };
  }

  checkOrder(r: Rational, node: ExprNode): Rational {
    if (Math.max(r.num.length, r.den.length) - 1 > MAX_ORDER) this.fail(`order above ${MAX_ORDER}; split the model or reduce it`, node);
    return r;
  }

  walk(node: ExprNode): Rational {
    switch (node.type) {
      case 'ConstantNode':
        if (typeof node.value !== 'number') this.fail(`only numbers and s are allowed, found ${JSON.stringify(node.value)}`, node);
        return this.constant(node.value, node);
      case 'SymbolNode':
        if (node.name === 's') return { num: [0, 1], den: [1], delayS: null };
        if (node.name === 'pi') return this.constant(Math.PI, node);
        return this.fail(`unknown symbol '${node.name}'; write the model in s only, ${EXAMPLE}`, node);
      case 'ParenthesisNode':
        return this.walk(node.content!);
      case 'OperatorNode':
        return this.checkOrder(this.operator(node), node);
      case 'FunctionNode':
        return this.checkOrder(this.func(node), node);
      default:
        return this.fail(`unsupported construct (${node.type.replace(/Node$/, '').toLowerCase()}); use numbers, s, + - * / ^, parentheses and exp(-T*s)`, node);
    }
  }

  operator(node: ExprNode): Rational {
    const args = node.args ?? [];
    switch (node.fn) {
      case 'unaryPlus':
        return this.walk(args[0]!);
      case 'unaryMinus': {
        const a = this.walk(args[0]!);
        return { num: polyScale(a.num, -1), den: a.den, delayS: a.delayS };
      }
      case 'add':
      case 'subtract': {
        const a = this.walk(args[0]!);
        let b = this.walk(args[1]!);
        if (a.delayS !== null || b.delayS !== null) {
          this.fail('a delay exp(-T*s) must multiply the whole model, not one term of a sum', a.delayS !== null ? args[0]! : args[1]!);
        }
        if (node.fn === 'subtract') b = { num: polyScale(b.num, -1), den: b.den, delayS: null };
        return sum(a, b);
      }
      case 'multiply': {
        const a = this.walk(args[0]!);
        const b = this.walk(args[1]!);
        if (a.delayS !== null && b.delayS !== null) this.fail('more than one delay; combine them into one exp(-T*s) factor', args[1]!);
        return { num: polyMul(a.num, b.num), den: polyMul(a.den, b.den), delayS: a.delayS ?? b.delayS };
      }
      case 'divide': {
        const a = this.walk(args[0]!);
        const b = this.walk(args[1]!);
        if (polyIsZero(b.num)) this.fail('division by a zero polynomial', args[1]!);
        if (b.delayS !== null && b.delayS > 0) this.fail('a delay in a denominator is a positive exponent exp(+T*s), which no real system has; use exp(-T*s) as a factor', args[1]!);
        return { num: polyMul(a.num, b.den), den: polyMul(a.den, b.num), delayS: a.delayS };
      }
      case 'pow':
        return this.power(node, args[0]!, args[1]!);
      default:
        return this.fail(`operator '${node.op ?? String(node.fn)}' is not allowed; use + - * / ^`, node);
    }
  }

  power(node: ExprNode, baseNode: ExprNode, expNode: ExprNode): Rational {
    const e = this.walk(expNode);
    if (e.delayS !== null || polyDegree(e.num) > 0 || polyDegree(e.den) > 0) this.fail('an exponent must be a plain number', expNode);
    const k = (e.num[0] ?? 0) / e.den[0]!;
    if (!Number.isInteger(k) || k < 0) this.fail(`exponent ${k} is not a whole number >= 0; write 1/(...)^n for negative powers`, expNode);
    if (k > MAX_ORDER) this.fail(`exponent ${k} gives an order above ${MAX_ORDER}`, expNode);
    const b = this.walk(baseNode);
    if (b.delayS !== null && k > 1) this.fail('more than one delay (a delay raised to a power); write one exp(-T*s) factor', node);
    return { num: polyPow(b.num, k), den: polyPow(b.den, k), delayS: k === 0 ? null : b.delayS };
  }

  func(node: ExprNode): Rational {
    const name = (node.fn as { name?: string } | undefined)?.name ?? '';
    const args = node.args ?? [];
    // mathjs reads `s(s+1)` as a call of a function named s; in a model it means s*(s+1).
    if (name === 's' && args.length === 1) {
      const a = this.walk(args[0]!);
      return { num: polyMul([0, 1], a.num), den: a.den, delayS: a.delayS };
    }
    if (name !== 'exp') this.fail(`unknown function '${name}'; only exp(-T*s) (a pure delay) is allowed`, node);
    if (args.length !== 1) this.fail('exp() takes one argument, e.g. exp(-0.001*s)', node);
    const a = this.walk(args[0]!);
    if (a.delayS !== null) this.fail('more than one delay; combine them into one exp(-T*s) factor', args[0]!);
    if (polyDegree(a.den) > 0) this.fail('exp() accepts only -T*s with a number T', args[0]!);
    const d = a.den[0]!;
    if (polyDegree(a.num) <= 0) return this.constant(Math.exp((a.num[0] ?? 0) / d), node);
    if (polyDegree(a.num) > 1 || a.num[0] !== 0) this.fail('exp() accepts only -T*s with a number T (a pure delay)', args[0]!);
    const c = a.num[1]! / d;
    if (c > 0) this.fail(`delay with a positive exponent exp(+${c}*s) is a prediction, not a delay; write exp(-T*s)`, args[0]!);
    return { num: [1], den: [1], delayS: -c };
  }
}

/** Sum of two delay-free rationals; equal denominators are kept once rather than squared. */
function sum(a: Rational, b: Rational): Rational {
  const same = a.den.length === b.den.length && a.den.every((c, i) => c === b.den[i]);
  if (same) return { num: polyAdd(a.num, b.num), den: a.den, delayS: null };
  return { num: polyAdd(polyMul(a.num, b.den), polyMul(b.num, a.den)), den: polyMul(a.den, b.den), delayS: null };
}

/** Parses a model in s (numbers, + - * / ^, parentheses, one exp(-T*s) factor); throws ExpressionError with a column. */
export function parseTransferFunction(text: string, role: Role): TransferFunction {
  if (text.trim() === '') throw new ExpressionError(`${role}: empty expression; write a model in s, ${EXAMPLE}`);
  let root: ExprNode;
  try {
    root = parser()(text);
  } catch (e) {
    const err = e as { message?: string; char?: number };
    const msg = (err.message ?? String(e)).replace(/\s*\(char \d+\)\s*$/, '');
    throw new ExpressionError(`${role}: syntax error: ${msg.charAt(0).toLowerCase()}${msg.slice(1)}`, typeof err.char === 'number' ? err.char : null);
  }
  const w = new Walker(role, text, root);
  const r = w.walk(root);
  let num = polyTrim(r.num);
  let den = polyTrim(r.den);
  if (polyIsZero(den)) throw new ExpressionError(`${role}: division by a zero polynomial`);
  const lead = den[den.length - 1]!;
  num = num.map((c) => c / lead);
  den = den.map((c) => c / lead);
  if (![...num, ...den].every(Number.isFinite)) {
    throw new ExpressionError(`${role}: coefficients overflow double precision; rescale the model (e.g. write time constants, not huge products)`);
  }
  const delayS = r.delayS ?? 0;
  if (role === 'plant' && polyDegree(num) > polyDegree(den)) {
    throw new ExpressionError(
      `plant: improper model (numerator order ${polyDegree(num)} > denominator order ${polyDegree(den)}); a physical plant has at least as many poles as zeros`,
    );
  }
  return { num, den, delayS };
}
