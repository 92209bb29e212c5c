import { CHART_STYLE } from './chart-style';
import { formatNumber } from '@/lib/text/format';

const W = 120;
const H = 28;

/**
 * A small chart of a unit's mean power per 10 minutes over the last hours,
 * drawn on the server (no script), with its figures in words for screen readers.
 */
export function Sparkline({ points, fromMs, toMs, ratedKw, hours }: { points: Array<{ t: number; kw: number | null }>; fromMs: number; toMs: number; ratedKw: number; hours: number }) {
  const values = points.filter((p): p is { t: number; kw: number } => p.kw !== null);
  if (values.length === 0) return <span className="spark-empty">no power data in the last {hours} h</span>;
  const top = Math.max(ratedKw, ...values.map((p) => p.kw));
  const bottom = Math.min(0, ...values.map((p) => p.kw));
  const sx = (t: number) => ((t - fromMs) / (toMs - fromMs)) * W;
  const sy = (v: number) => H - 1 - ((v - bottom) / (top - bottom || 1)) * (H - 2);
  // Break the line where 10-minute buckets are missing (a gap stays a gap).
  const runs: string[] = [];
  let run: string[] = [];
  let prev: number | undefined;
  for (const p of values) {
    if (prev !== undefined && p.t - prev > 10 * 60_000 * 1.5) {
      runs.push(run.join(' '));
      run = [];
    }
    run.push(`${sx(p.t).toFixed(1)},${sy(p.kw).toFixed(1)}`);
    prev = p.t;
  }
  runs.push(run.join(' '));
  const last = values[values.length - 1] as { kw: number };
  const peak = Math.max(...values.map((p) => p.kw));
  const label = `Power over the last ${hours} h: latest ${formatNumber(last.kw, 1, 'kW')}, peak ${formatNumber(peak, 1, 'kW')}, rated ${formatNumber(ratedKw, 0, 'kW')}`;
  return (
    <svg className="sparkline" width={W} height={H} viewBox={`0 0 ${W} ${H}`} role="img" aria-label={label}>
      <line x1="0" y1={sy(ratedKw)} x2={W} y2={sy(ratedKw)} stroke={CHART_STYLE.sparkRated.color} strokeWidth={CHART_STYLE.sparkRated.width} strokeDasharray={CHART_STYLE.sparkRated.dash} />
      {runs.map((r, i) =>
        r.includes(' ') ? (
          <polyline key={i} points={r} fill="none" stroke={CHART_STYLE.sparkPower.color} strokeWidth={CHART_STYLE.sparkPower.width} strokeLinejoin="round" />
        ) : (
          <circle key={i} cx={r.split(',')[0]} cy={r.split(',')[1]} r="1.6" fill={CHART_STYLE.sparkPower.color} />
        ),
      )}
    </svg>
  );
}
