import { Text } from 'ink';
import type { StyledLine, Tone } from './styled.js';

type ToneProps = { color?: string; bold?: boolean; dimColor?: boolean; inverse?: boolean };

const TONE: Record<Tone, ToneProps> = {
  plain: {},
  title: { bold: true },
  dim: { dimColor: true },
  selected: { inverse: true },
  info: { color: 'cyan' },
  error: { color: 'yellow' },
  pass: { color: 'green' },
  fail: { color: 'red' },
  unstable: { color: 'magenta' },
};

/** Screen lines, one `Text` each, cut (never wrapped) at the frame edge; tones only when colour is on. */
export function Lines({ lines, colour }: { readonly lines: readonly StyledLine[]; readonly colour: boolean }) {
  return (
    <>
      {lines.map((l, i) => (
        <Text key={i} wrap="truncate-end" {...(colour ? TONE[l.tone ?? 'plain'] : {})}>
          {l.text === '' ? ' ' : l.text}
        </Text>
      ))}
    </>
  );
}
