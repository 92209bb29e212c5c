/** "12 s ago", "5 min ago", "3 h ago", "2 d ago" from a time and now. */
export function ago(time: Date | null, now: Date): string {
  if (time === null) return 'never';
  const s = Math.max(0, Math.round((now.getTime() - time.getTime()) / 1000));
  if (s < 90) return `${s} s ago`;
  if (s < 90 * 60) return `${Math.round(s / 60)} min ago`;
  if (s < 36 * 3600) return `${Math.round(s / 3600)} h ago`;
  return `${Math.round(s / 86400)} d ago`;
}
