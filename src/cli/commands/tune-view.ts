import { metricsToContractJson } from '../../analysis/contract-json.js';
import type { Proposal, ProposalStage } from '../../design/propose.js';
import { formatWorksheet } from '../../design/worksheet.js';
import { formatBlock } from '../../engine/block-syntax.js';
import { formatMetricValue, formatRequirement } from '../../engine/requirement-syntax.js';
import type { Block } from '../../model/blocks.js';
import type { LoopMetrics } from '../../model/metrics.js';
import { formatNumber, type FreqUnit } from '../../model/units.js';
import { statusText, table } from '../output.js';

/** Presentation of a design proposal: plain lines and the JSON object. No numerics. */

export const SAFETY_NOTE =
  'safety: model margins do not replace verification on the machine. Try new gains first at reduced gain, with limits set and an emergency stop in reach; machine-safety standards and local regulations govern.';

/** Block words as `comp set` takes them, in the display unit. */
export function blockWords(blocks: readonly Block[], unit: FreqUnit): string {
  return blocks.map((b) => formatBlock(b, unit)).join(' ');
}

function stageLine(title: string, s: ProposalStage, unit: FreqUnit): string {
  const pm = Number.isFinite(s.worstPmDeg) ? `${formatNumber(s.worstPmDeg, 4)}deg` : 'no crossover';
  return `${title.padEnd(9)} ${blockWords(s.blocks, unit)}   (worst-variant PM ${pm})`;
}

/** One row of predicted headline metrics for a variant. */
function metricsRow(variant: string, m: LoopMetrics | null, error: string | undefined, pass: boolean, unit: FreqUnit): string[] {
  if (m === null) return [variant, statusText('error'), error ?? 'cannot be analysed', '', '', '', ''];
  const status = !m.stable ? 'unstable' : pass ? 'pass' : 'fail';
  const f = (x: number | null, metric: 'pm' | 'gm' | 'fc' | 'ms' | 'os') => formatMetricValue(metric, x, unit);
  return [
    variant,
    statusText(status),
    `PM ${f(m.phaseMarginDeg, 'pm')}`,
    `GM ${m.gainMarginDb === null ? 'inf' : f(m.gainMarginDb, 'gm')}`,
    `fc ${m.gainCrossoversRadS.length === 0 ? '-' : f(Math.max(...m.gainCrossoversRadS), 'fc')}`,
    `Ms ${f(m.peakSensitivity, 'ms')}`,
    `os ${m.step === null ? '-' : f(m.step.overshootPct, 'os')}`,
  ];
}

/** The proposal as plain text: worksheet, blocks, predictions per variant, requirement outcomes, verdict, safety. */
export function proposalLines(p: Proposal, title: string, unit: FreqUnit): string[] {
  const out: string[] = [title, ''];
  out.push('worksheet:', ...formatWorksheet(p.worksheet, unit).map((l) => `  ${l}`), '');
  if (p.replaced.length > 0) out.push(`replaces: ${blockWords(p.replaced, unit)}`);
  if (p.kept.length > 0) out.push(`keeps:    ${blockWords(p.kept, unit)}`);
  if (p.blocks.length === 0) {
    out.push(`no proposal: ${p.message}`, '', SAFETY_NOTE);
    return out;
  }
  if (p.hand) out.push(stageLine('hand:', p.hand, unit));
  if (p.refined) out.push(stageLine('refined:', p.refined, unit));
  out.push('', 'proposed compensator:', `  ${blockWords(p.blocks, unit)}`, `  as an expression: ${p.compExpr}`, '');
  out.push('predicted, per variant:');
  const rows = p.perVariant.map((v) => metricsRow(v.variant, v.metrics, v.error, v.outcomes.every((o) => o.pass), unit));
  out.push(...table(rows).map((l) => `  ${l}`), '');
  if (p.requirements.length > 0) {
    out.push('requirements:');
    const reqRows: string[][] = [];
    for (const v of p.perVariant) {
      for (const o of v.outcomes) {
        const r = o.requirement;
        const label = r.text.endsWith('(target)') ? `${formatRequirement(r, unit)} (target)` : formatRequirement(r, unit);
        reqRows.push([label, v.variant, formatMetricValue(r.metric, o.value, unit), statusText(o.pass ? 'pass' : 'fail'), o.reason ?? '']);
      }
    }
    out.push(...table(reqRows).map((l) => `  ${l}`), '');
  }
  out.push(`${p.ok ? statusText('pass') : statusText(p.perVariant.some((v) => v.metrics !== null && !v.metrics.stable) ? 'unstable' : 'fail')}: ${p.message}`, '', SAFETY_NOTE);
  return out;
}

/** Frequencies in worksheet steps stay rad/s in JSON, as everywhere. */
function stageJson(s: ProposalStage | null, unit: FreqUnit): Record<string, unknown> | null {
  if (s === null) return null;
  return { blocks: blocksJson(s.blocks, unit), comp_expr: s.compExpr, worst_phase_margin_deg: s.worstPmDeg };
}

/** Blocks with their parameters (base units) and their block word. */
export function blocksJson(blocks: readonly Block[], unit: FreqUnit): Record<string, unknown>[] {
  return blocks.map((b) => {
    const params: Record<string, unknown> = { kind: b.kind, text: formatBlock(b, unit) };
    switch (b.kind) {
      case 'gain': params.k = b.k; break;
      case 'pi': params.zero_rad_s = b.zeroRadS; break;
      case 'lead': case 'lag': params.zero_rad_s = b.zeroRadS; params.pole_rad_s = b.poleRadS; break;
      case 'pid': Object.assign(params, { kp: b.kp, ki: b.ki, kd: b.kd, filter_rad_s: b.filterRadS }); break;
      case 'notch': Object.assign(params, { center_rad_s: b.centerRadS, depth_db: b.depthDb, q: b.q }); break;
      case 'lowpass1': params.corner_rad_s = b.cornerRadS; break;
      case 'lowpass2': Object.assign(params, { corner_rad_s: b.cornerRadS, zeta: b.zeta }); break;
      case 'expr': params.expr = b.text; break;
      default: break;
    }
    return params;
  });
}

/** The proposal as one JSON object (numbers in base units; the caller turns infinities into "inf"). */
export function proposalJson(p: Proposal, unit: FreqUnit): Record<string, unknown> {
  return {
    method: p.method,
    ok: p.ok,
    message: p.message,
    comp_expr: p.compExpr,
    blocks: blocksJson(p.blocks, unit),
    worksheet: p.worksheet.map((s) => ({ label: s.label, value: s.value, unit: s.unit })),
    hand: stageJson(p.hand, unit),
    refined: stageJson(p.refined, unit),
    kept: blocksJson(p.kept, unit),
    replaced: blocksJson(p.replaced, unit),
    requirements: p.requirements.map((r) => r.text),
    variants: p.perVariant.map((v) => ({
      variant: v.variant,
      metrics: v.metrics === null ? null : metricsToContractJson(v.metrics),
      error: v.error ?? null,
      requirements: v.outcomes.map((o) => ({ requirement: o.requirement.text, value: o.value, pass: o.pass, reason: o.reason ?? null })),
    })),
    safety: SAFETY_NOTE,
  };
}
