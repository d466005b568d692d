import { useEffect, useState } from 'react';
import type { DashSource } from './source.js';

/**
 * A counter that moves whenever another process has committed to the store.
 * Polls the source's data version (one SQLite pragma, microseconds) every
 * `intervalMs`; screens reload what they show when the counter moves. Our own
 * saves do not move the data version, so the app bumps its own counter then.
 */
export function useDataVersion(source: DashSource, intervalMs: number): number {
  const [tick, setTick] = useState(0);
  useEffect(() => {
    let last = safeVersion(source);
    const timer = setInterval(() => {
      const v = safeVersion(source);
      if (v !== last) {
        last = v;
        setTick((t) => t + 1);
      }
    }, intervalMs);
    return () => clearInterval(timer);
  }, [source, intervalMs]);
  return tick;
}

/** The data version, or NaN when the store cannot be read right now (a locked or vanished file): never throws into a timer. */
function safeVersion(source: DashSource): number {
  try {
    return source.dataVersion();
  } catch {
    return Number.NaN;
  }
}
