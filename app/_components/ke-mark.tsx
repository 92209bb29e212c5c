import { CHART_STYLE } from './chart-style';
import { formatRatio } from '@/lib/text/format';

/** Scale of the mark: corrected Ke ratios from 0.90 to 1.05 of nameplate. */
const LO = 0.9;
const HI = 1.05;
const W = 96;
const H = 14;
const x = (v: number) => Math.max(0, Math.min(W, ((v - LO) / (HI - LO)) * W));

/**
 * The corrected Ke ratio with its 95 % interval as text, and a small scale
 * that marks the warning and alarm lines: the interval a bar, the ratio a
 * dot, the lines as ticks. The words say where it stands, for everyone.
 */
export function KeMark({
  ratio,
  low,
  high,
  warn,
  alarm,
}: {
  ratio: number | null;
  low: number | null;
  high: number | null;
  warn: number;
  alarm: number;
}) {
  if (ratio === null) return <span className="muted">–</span>;
  const where = ratio < alarm ? `below the alarm line ${alarm}` : ratio < warn ? `below the warning line ${warn}` : `above the warning line ${warn}`;
  const tone = ratio < alarm ? 'state-fault' : ratio < warn ? 'state-warning' : '';
  return (
    <span className="ke-cell">
      <span>
        <strong className={tone}>{formatRatio(ratio)}</strong>
        {low !== null && high !== null ? (
          <span className="muted">
            {' '}
            ({formatRatio(low)}–{formatRatio(high)})
          </span>
        ) : null}
      </span>
      <svg className="ke-scale" width={W} height={H} viewBox={`0 0 ${W} ${H}`} role="img" aria-label={`Ke ratio ${formatRatio(ratio)}, ${where}`}>
        <line x1="0" y1={H / 2} x2={W} y2={H / 2} stroke="#8a9196" strokeWidth="1" />
        <line x1={x(alarm)} y1="0" x2={x(alarm)} y2={H} stroke={CHART_STYLE.keAlarmLine.color} strokeWidth="2" />
        <line x1={x(warn)} y1="2" x2={x(warn)} y2={H - 2} stroke={CHART_STYLE.keWarnLine.color} strokeWidth="2" strokeDasharray="2 1.5" />
        <line x1={x(1)} y1="4" x2={x(1)} y2={H - 4} stroke="#545d63" strokeWidth="1" />
        {low !== null && high !== null ? <rect x={x(low)} y={H / 2 - 2.5} width={Math.max(1.5, x(high) - x(low))} height="5" fill="#545d63" opacity="0.55" /> : null}
        <circle cx={x(ratio)} cy={H / 2} r="3.2" fill="#1b2429" />
      </svg>
    </span>
  );
}
