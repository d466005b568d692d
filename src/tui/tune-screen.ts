import type { FreqUnit } from '../model/units.js';
import { blockText } from './block-lines.js';
import { checklistLines } from './checklist-lines.js';
import type { DashState } from './dash-state.js';
import { headlineText } from './headline-text.js';
import type { ScreenLines } from './loop-screen.js';
import { cleanText } from './sanitize.js';
import { statusLabel } from './status.js';
import { marker, type StyledLine } from './styled.js';
import { truncate } from './text.js';
import type { ProposalVM, TuneMethodVM } from './view-model.js';

/**
 * The tune screen: the design methods, and the selected method's proposal
 * (blocks, predicted status and checks, then the worksheet, scrolled with
 * PgUp/PgDn). Nothing is written until `s` and a note.
 */
export function tuneScreen(
  loopId: string, methods: readonly TuneMethodVM[], s: DashState, proposal: ProposalVM | null,
  unit: FreqUnit, width: number, height: number,
): ScreenLines {
  const head: StyledLine[] = [{ text: truncate(`Tune ${cleanText(loopId)}: pick a method, Enter runs it; nothing is saved until s`, width), tone: 'title' }];
  if (methods.length === 0) head.push({ text: 'the design assistant offers no method here', tone: 'dim' });
  const list: StyledLine[] = methods.map((m) => ({
    text: truncate(`${marker(m.key === s.tuneMethod)}${m.key.padEnd(9)} ${cleanText(m.label)}`, width),
    tone: m.key === s.tuneMethod ? 'selected' : 'plain',
  }));
  const body: StyledLine[] = [];
  if (proposal && !proposal.ok) body.push({ text: truncate(`no proposal: ${cleanText(proposal.error)}`, width), tone: 'error' });
  if (proposal?.ok) {
    body.push(
      { text: truncate(`proposal: ${proposal.blocks.map((b) => blockText(b, unit)).join(' ')}`, width), tone: 'info' },
      { text: truncate(`predicted ${statusLabel(proposal.status)}: ${cleanText(proposal.message)}`, width), tone: proposal.status },
      ...proposal.variants.map((v) => ({ text: truncate(`  ${cleanText(v.name).padEnd(9)} ${v.error ? `? ${cleanText(v.error)}` : headlineText(v.headline, unit)}`, width) })),
      ...checklistLines(proposal.checks, unit, width).slice(1).map((text) => ({ text, tone: text.startsWith('x') ? ('fail' as const) : ('plain' as const) })),
      { text: proposal.meets ? 's saves it as a new revision (the worksheet goes into the note)' : 'misses a requirement: it cannot be saved from here', tone: 'dim' },
      { text: 'worksheet (PgUp/PgDn)', tone: 'dim' },
      ...proposal.worksheet.map((w) => ({ text: truncate('  ' + cleanText(w), width) })),
    );
  }
  const prompt: StyledLine[] = s.typing === 'note' ? [{ text: truncate(`note for this revision: ${s.note}_`, width), tone: 'info' }] : [];
  const room = Math.max(1, height - head.length - list.length - prompt.length - 1);
  const top = Math.max(0, Math.min(s.scroll, body.length - room));
  return {
    lines: [...head, ...list, { text: '' }, ...body.slice(top, top + room), ...prompt],
    contentRows: body.length,
    pageRows: room,
    panes: 1,
  };
}
