/** "just now", "5 min ago", "3 h ago", "4 d ago", else the date: short enough for a header line. */
export function formatWhen(iso: string, nowMs: number): string {
  const t = Date.parse(iso);
  if (Number.isNaN(t)) return '?';
  const ageS = Math.round((nowMs - t) / 1000);
  if (ageS < 0) return iso.slice(0, 10);
  if (ageS < 60) return 'just now';
  if (ageS < 3600) return `${Math.floor(ageS / 60)} min ago`;
  if (ageS < 86400) return `${Math.floor(ageS / 3600)} h ago`;
  if (ageS < 14 * 86400) return `${Math.floor(ageS / 86400)} d ago`;
  return iso.slice(0, 10);
}
