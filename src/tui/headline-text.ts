import { formatNumber, formatFrequency, type FreqUnit } from '../model/units.js';
import type { HeadlineVM } from './view-model.js';

const or = (x: number | null, f: (v: number) => string) => (x === null ? '-' : f(x));

/** "PM 52.1deg  GM 12dB  fc 41.2Hz  bw 60Hz  Ms 1.32": a loop's headline numbers in one line. */
export function headlineText(h: HeadlineVM, unit: FreqUnit): string {
  return [
    `PM ${or(h.pmDeg, (v) => formatNumber(v, 3) + 'deg')}`,
    `GM ${or(h.gmDb, (v) => formatNumber(v, 3) + 'dB')}`,
    `fc ${or(h.crossoverRadS, (v) => formatFrequency(v, unit, 3))}`,
    `bw ${or(h.bandwidthRadS, (v) => formatFrequency(v, unit, 3))}`,
    `Ms ${or(h.peakSensitivity, (v) => formatNumber(v, 3))}`,
  ].join('  ');
}
