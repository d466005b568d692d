import { compensatorTf } from '../design/blocks-tf.js';
import type { Block, Compensator } from '../model/blocks.js';
import { UserError } from '../model/errors.js';
import type { Requirement } from '../model/requirements.js';
import type { TransferFunction } from '../model/tf.js';
import type { FreqUnit } from '../model/units.js';
import { formatBlock, parseBlock } from './block-syntax.js';
import { parseRequirement } from './requirement-syntax.js';
import type { BlockInput, PlantVariant, RequirementInput } from './types.js';

/**
 * Turning what a user typed (or a face built) into checked model values, before
 * any transaction starts. The expression parser (mathjs) is loaded only when
 * there is an expression to parse.
 */

type ExprParser = (text: string, role: 'plant' | 'compensator') => TransferFunction;

async function exprParser(): Promise<ExprParser> {
  return (await import('../analysis/parse.js')).parseTransferFunction;
}

/** Parses a plant expression; improper plants are refused by the parser. */
export async function parsePlant(text: string): Promise<PlantVariant> {
  const parse = await exprParser();
  return { text: text.trim(), tf: parse(text, 'plant') };
}

const isExprWord = (w: string) => /^\s*expr\s*:/i.test(w);

/** Block words or blocks -> checked blocks, in the store's unit. */
export async function parseBlocks(inputs: readonly BlockInput[], unit: FreqUnit): Promise<Block[]> {
  const needsParser = inputs.some((b) => typeof b === 'string' && isExprWord(b));
  const parse = needsParser ? await exprParser() : null;
  const parseExpr = (t: string) => {
    if (parse === null) throw new Error('expression parser not loaded');
    return parse(t, 'compensator');
  };
  return inputs.map((b) => checkBlock(typeof b === 'string' ? parseBlock(b, unit, parseExpr) : b));
}

/** Requirement words or requirements -> requirements, in the store's unit. */
export function parseRequirements(inputs: readonly RequirementInput[], unit: FreqUnit): Requirement[] {
  if (inputs.length === 0) throw new UserError('give at least one requirement, e.g. pm>=45 gm>=6dB');
  return inputs.map((r) => (typeof r === 'string' ? parseRequirement(r, unit) : checkRequirement(r)));
}

function checkRequirement(r: Requirement): Requirement {
  if (!Number.isFinite(r.value) || (r.op !== '>=' && r.op !== '<=')) throw new UserError(`requirement '${r.text}': needs a finite limit and >= or <=`);
  return r;
}

const positive = (x: number) => Number.isFinite(x) && x > 0;

/** Checks a block built by a face (parsed words are already checked, but cheaply checked again). */
export function checkBlock(b: Block): Block {
  const bad = (why: string): never => {
    throw new UserError(`block ${b.kind}: ${why}`);
  };
  switch (b.kind) {
    case 'gain': if (!Number.isFinite(b.k) || b.k === 0) bad('the gain must be a finite, non-zero number'); break;
    case 'integrator': break;
    case 'pi': if (!positive(b.zeroRadS)) bad('the zero frequency must be above zero'); break;
    case 'lead':
    case 'lag':
      if (!positive(b.zeroRadS) || !positive(b.poleRadS)) bad('zero and pole frequencies must be above zero');
      if (b.kind === 'lead' ? b.zeroRadS >= b.poleRadS : b.poleRadS >= b.zeroRadS) bad(`a ${b.kind} needs its ${b.kind === 'lead' ? 'zero below its pole' : 'pole below its zero'}`);
      break;
    case 'pid':
      if (![b.kp, b.ki, b.kd].every(Number.isFinite) || (b.kp === 0 && b.ki === 0 && b.kd === 0)) bad('kp, ki, kd must be finite and not all zero');
      if (!(b.filterRadS > 0)) bad('the derivative filter frequency must be above zero (or infinite for an ideal derivative)');
      break;
    case 'notch': if (!positive(b.centerRadS) || !positive(b.depthDb) || !positive(b.q)) bad('centre, depth and q must be above zero'); break;
    case 'lowpass1': if (!positive(b.cornerRadS)) bad('the corner frequency must be above zero'); break;
    case 'lowpass2': if (!positive(b.cornerRadS) || !positive(b.zeta)) bad('corner and zeta must be above zero'); break;
    case 'expr':
      if (![...b.tf.num, ...b.tf.den, b.tf.delayS].every(Number.isFinite) || b.tf.den.every((c) => c === 0)) bad(`'${b.text}' has a non-finite coefficient or a zero denominator`);
      break;
    default: bad('unknown block kind');
  }
  return b;
}

/** A compensator from checked blocks; an improper one must be marked ideal. */
export function makeCompensator(blocks: readonly Block[], ideal: boolean, unit: FreqUnit): Compensator {
  const tf = compensatorTf({ blocks });
  if (!ideal && tf.num.length > tf.den.length) {
    throw new UserError(`compensator ${blocks.map((b) => formatBlock(b, unit)).join(' ')} has more zeros than poles; add a derivative filter (pid:...,filter=F) or a low-pass, or mark it ideal`);
  }
  return ideal ? { blocks: [...blocks], ideal: true } : { blocks: [...blocks] };
}
