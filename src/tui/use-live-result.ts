import { useEffect, useState } from 'react';
import type { EditState } from './dash-state.js';
import type { LiveResult } from './edit-screen.js';
import type { DashSource } from './source.js';
import type { FreqUnit } from '../model/units.js';

// Wait this long after the last key before recomputing, so a fast typist does
// not queue one analysis per character; short enough to feel immediate.
const SETTLE_MS = 40;

/**
 * The draft of the edit screen, recomputed through the engine's what-if (which
 * writes nothing) whenever its text changes. Keeps the last result that could
 * be computed, so a half-typed block shows its error over the last good numbers.
 */
export function useLiveResult(source: DashSource, edit: EditState | null, unit: FreqUnit): LiveResult {
  const [live, setLive] = useState<LiveResult>({ current: null, lastGood: null });
  const key = edit ? JSON.stringify([edit.loopId, edit.blocks, edit.requirements]) : null;
  useEffect(() => {
    if (edit === null) {
      setLive({ current: null, lastGood: null });
      return;
    }
    let active = true;
    setLive((l) => ({ ...l, current: null }));
    const timer = setTimeout(() => {
      source
        .whatIf(edit.loopId, { unit, blocks: edit.blocks, requirements: edit.requirements })
        .then(
          (r) => active && setLive((l) => ({ current: r, lastGood: r.ok ? r : l.lastGood })),
          (e: unknown) => active && setLive((l) => ({ ...l, current: { ok: false, error: e instanceof Error ? e.message : String(e) } })),
        );
    }, SETTLE_MS);
    return () => {
      active = false;
      clearTimeout(timer);
    };
  }, [source, key, unit]);
  return live;
}
