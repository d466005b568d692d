import type { Block } from '../model/blocks.js';
import { formatNumber } from '../model/units.js';
import { gridBetween, refineParameter, worstPmOver } from './refine.js';
import { magnitudeCrossingsRadS, shapeMagnitude, withBlocks } from './shape.js';
import type { DesignOutcome, DesignVariant } from './types.js';
import { Worksheet } from './worksheet.js';

/** Settings of the notch proposal. */
export interface NotchSettings {
  /** Plant poles with damping below this count as resonances (default 0.15). */
  readonly zetaMax: number;
  /** Phase margin to keep after the notches; null: no limit (margins are still reported). */
  readonly pmDeg: number | null;
  /** Gain margin wanted at the modes (dB): each notch is at least deep enough to put |L| this far below 0 dB. */
  readonly gmDb: number;
}

/** A lightly damped pole pair of one variant's plant. */
export interface Resonance {
  readonly variant: string;
  readonly wnRadS: number;
  readonly zeta: number;
}

/** Lightly damped pole pairs (upper half-plane members) of every variant's plant. */
export function findResonances(variants: readonly DesignVariant[], zetaMax: number): Resonance[] {
  const out: Resonance[] = [];
  for (const v of variants) {
    for (const p of v.plant.poles) {
      if (!(p.im > 0)) continue;
      const wn = Math.hypot(p.re, p.im);
      const zeta = -p.re / wn;
      if (zeta < zetaMax) out.push({ variant: v.name, wnRadS: wn, zeta });
    }
  }
  return out.sort((a, b) => a.wnRadS - b.wnRadS);
}

/** Groups resonances whose frequencies lie within a factor 1.5 of their neighbour (the same mode in several variants). */
function clusters(rs: readonly Resonance[]): Resonance[][] {
  const out: Resonance[][] = [];
  for (const r of rs) {
    const last = out[out.length - 1];
    if (last && r.wnRadS <= last[last.length - 1]!.wnRadS * 1.5) last.push(r);
    else out.push([r]);
  }
  return out;
}

/** Pole damping of the notch: wide enough to cover the spread of the mode over the variants. */
function notchPoleDamping(spread: number): number {
  const halfWidth = Math.sqrt(spread) - 1;
  return Math.min(1, Math.max(0.25, 3 * halfWidth));
}

/**
 * A notch at wn with pole damping zp, deep enough both to flatten the mode (zeros at
 * the mode's damping) and to leave |L| at least gmDb below 0 dB there (peakDb is |L|
 * at the mode without it); clamped to 10..40 dB.
 */
function notchFor(wnRadS: number, zp: number, zetaMode: number, peakDb: number, gmDb: number): Block {
  const depthDb = Math.min(40, Math.max(10, 20 * Math.log10(zp / zetaMode), peakDb + gmDb));
  return { kind: 'notch', centerRadS: wnRadS, depthDb, q: 1 / (2 * zp) };
}

/**
 * Notch proposal: every lightly damped plant mode above the crossover gets one notch,
 * centred on the mode (the geometric middle when variants move it), as wide as the
 * spread of the mode over the variants needs, and as deep as the mode is sharp (its
 * zeros at the mode's damping). When the notches take the phase margin below the
 * limit, each is narrowed until the margin holds. Existing blocks are kept.
 */
export function designNotch(variants: readonly DesignVariant[], designIndex: number, s: NotchSettings): DesignOutcome {
  const ws = new Worksheet();
  const v = variants[designIndex]!;
  ws.section('resonances of the plant (poles with low damping)');
  // The lowest crossover: a resonance peak that pokes above 0 dB adds crossovers of its own.
  const cross = magnitudeCrossingsRadS(v.shape, 1);
  const wc = cross.length > 0 ? cross[0]! : 0;
  ws.add(`present (lowest) crossover (variant ${v.name})`, wc > 0 ? wc : 'none', wc > 0 ? 'rad/s' : '');
  const res = findResonances(variants, s.zetaMax);
  if (res.length === 0) {
    return { blocks: [], hand: null, refined: null, worksheet: ws.steps, feasible: false, message: `no plant pole has damping below ${formatNumber(s.zetaMax)}: there is no resonance to notch` };
  }
  const notches: { block: Block; zeta: number; zp: number; peakDb: number }[] = [];
  const skipped: string[] = [];
  for (const c of clusters(res)) {
    const lo = c[0]!.wnRadS;
    const hi = c[c.length - 1]!.wnRadS;
    const centre = Math.sqrt(lo * hi);
    const zeta = Math.min(...c.map((r) => r.zeta));
    ws.section(`mode near ${formatNumber(centre)} rad/s`);
    ws.add('natural frequency (lowest variant)', lo, 'rad/s');
    ws.add('natural frequency (highest variant)', hi, 'rad/s');
    ws.add('smallest damping', zeta);
    const peakDb = 20 * Math.log10(Math.max(...c.map((r) => shapeMagnitude(variants.find((x) => x.name === r.variant)!.shape, r.wnRadS))));
    ws.add('|L| at the mode, present compensator', peakDb, 'dB');
    if (centre <= 1.5 * wc) {
      ws.add('skipped: at or below 1.5 x crossover', null);
      skipped.push(formatNumber(centre));
      continue;
    }
    const zp = notchPoleDamping(hi / lo);
    const block = notchFor(centre, zp, zeta, peakDb, s.gmDb);
    notches.push({ block, zeta, zp, peakDb });
    if (block.kind === 'notch') {
      ws.add('notch centre', block.centerRadS, 'rad/s');
      ws.add('notch pole damping (width)', zp);
      ws.add('depth: largest of 20 log10(width / mode damping) and |L| + wanted GM', block.depthDb, 'dB');
      ws.add('notch q = 1/(2 damping)', block.q);
    }
  }
  const skipNote = skipped.length > 0 ? `; modes at ${skipped.join(', ')} rad/s are at or below the crossover, where a notch would take the phase margin (lower the crossover or stiffen the mechanics)` : '';
  if (notches.length === 0) return { blocks: [], hand: null, refined: null, worksheet: ws.steps, feasible: false, message: `no resonance above the crossover to notch${skipNote}` };
  let blocks = notches.map((n) => n.block);
  const pmBefore = worstPmOver(variants, []);
  ws.section('recheck');
  ws.add('phase margin before (worst variant)', pmBefore, 'deg');
  let pm = worstPmOver(variants, blocks);
  ws.add('phase margin with the notches (worst variant)', pm, 'deg');
  const hand = { blocks, worstPmDeg: pm };
  if (s.pmDeg !== null && pm < s.pmDeg && pmBefore >= s.pmDeg) {
    // Narrow every notch by the same factor until the margin holds again.
    const build = (f: number) => notches.map((n) => notchFor(blocks0Centre(n.block), n.zp * f, n.zeta, n.peakDb, s.gmDb));
    const r = refineParameter((f) => worstPmOver(variants, build(f)), gridBetween(0.1, 1, 30), s.pmDeg, 'last');
    blocks = build(r.x);
    pm = r.pmDeg;
    ws.add('width factor that keeps the phase margin', r.x);
    ws.add('phase margin after narrowing (worst variant)', pm, 'deg');
  }
  const gmNote = gainMarginNote(variants, blocks, s.zetaMax);
  const ok = s.pmDeg === null || pm >= s.pmDeg;
  const msg = `${blocks.length} notch(es) proposed${gmNote}${skipNote}`;
  return { blocks, hand, refined: { blocks, worstPmDeg: pm }, worksheet: ws.steps, feasible: ok, message: ok ? msg : `${msg}; the phase margin stays below ${formatNumber(s.pmDeg ?? 0)} deg` };
}

function blocks0Centre(b: Block): number {
  return b.kind === 'notch' ? b.centerRadS : NaN;
}

/** The highest |L| above the crossover before and after, as a short note. */
function gainMarginNote(variants: readonly DesignVariant[], blocks: readonly Block[], zetaMax: number): string {
  let worst = 0;
  for (const v of variants) {
    const after = withBlocks(v, blocks).shape;
    for (const r of findResonances([v], zetaMax)) worst = Math.max(worst, shapeMagnitude(after, r.wnRadS));
  }
  return worst > 0 ? `; |L| at the modes is now at most ${formatNumber(20 * Math.log10(worst), 3)} dB` : '';
}
