'use client';
/**
 * The unit screen's charts (recharts; drawn in the browser after hydration).
 * Every axis names its unit; lines and symbols have at least 3:1 contrast on
 * white and differ by dash or shape as well as colour. Each chart sits in a
 * <figure> whose caption and table (on the page) say the same in words.
 */
import {
  Area,
  CartesianGrid,
  ComposedChart,
  Line,
  ReferenceLine,
  ResponsiveContainer,
  Scatter,
  Tooltip,
  XAxis,
  YAxis,
} from 'recharts';
import { CHART_STYLE as S, seriesStyle } from './chart-style';

const AXIS = { stroke: '#545d63', fontSize: 12 } as const;

function timeTick(timeZone: string, spanMs: number) {
  const withDate = spanMs > 36 * 3_600_000;
  const f = new Intl.DateTimeFormat('en-GB', withDate ? { timeZone, day: 'numeric', month: 'short' } : { timeZone, hour: '2-digit', minute: '2-digit', hourCycle: 'h23' });
  return (t: number) => f.format(new Date(t));
}

function fullTime(timeZone: string) {
  const f = new Intl.DateTimeFormat('en-GB', { timeZone, day: 'numeric', month: 'short', year: 'numeric', hour: '2-digit', minute: '2-digit', hourCycle: 'h23' });
  return (t: unknown) => f.format(new Date(Number(t)));
}

/** Terminal voltage and corrected EMF against speed, with the nameplate line at the chart's magnet temperature. */
export function EmfScatter({
  terminal,
  corrected,
  lineKeVPerKrpm,
  alarmRatio,
  maxRpm,
  magnetC,
}: {
  terminal: Array<{ rpm: number; v: number }>;
  corrected: Array<{ rpm: number; v: number }>;
  lineKeVPerKrpm: number;
  alarmRatio: number;
  maxRpm: number;
  magnetC: number;
}) {
  const topRpm = Math.max(maxRpm, ...terminal.map((p) => p.rpm));
  const lineV = (rpm: number) => (lineKeVPerKrpm * rpm) / 1000;
  return (
    <div className="chart-box" data-testid="emf-chart" data-points={terminal.length + corrected.length}>
      <ResponsiveContainer width="100%" height="100%">
        <ComposedChart margin={{ top: 10, right: 16, bottom: 28, left: 8 }}>
          <CartesianGrid stroke="#e4e5e1" />
          <XAxis type="number" dataKey="rpm" domain={[0, Math.ceil(topRpm / 50) * 50]} tick={AXIS} label={{ value: 'Speed, rpm', position: 'insideBottom', offset: -16, fill: '#1b2429' }} />
          <YAxis type="number" dataKey="v" domain={[0, 'auto']} tick={AXIS} width={66} label={{ value: 'Line voltage, V', angle: -90, position: 'insideLeft', fill: '#1b2429', style: { textAnchor: 'middle' } }} />
          <Tooltip formatter={(v) => `${Number(v).toFixed(0)} V`} labelFormatter={() => ''} />
          <ReferenceLine
            className="nameplate-line"
            segment={[
              { x: 0, y: 0 },
              { x: topRpm, y: lineV(topRpm) },
            ]}
            stroke={S.nameplateLine.color}
            strokeWidth={S.nameplateLine.width}
            ifOverflow="extendDomain"
            label={{ value: `nameplate at ${magnetC.toFixed(0)} °C`, position: 'insideTopLeft', fill: S.nameplateLine.color, fontSize: 12 }}
          />
          <ReferenceLine
            className="alarm-line"
            segment={[
              { x: 0, y: 0 },
              { x: topRpm, y: lineV(topRpm) * alarmRatio },
            ]}
            stroke={S.emfAlarmLine.color}
            strokeDasharray={S.emfAlarmLine.dash}
            strokeWidth={S.emfAlarmLine.width}
            label={{ value: `alarm line ${alarmRatio}`, position: 'insideBottomRight', fill: S.emfAlarmLine.color, fontSize: 12 }}
          />
          <Scatter name="Terminal voltage (as measured)" data={terminal} fill="none" stroke={S.emfTerminal.color} shape="circle" isAnimationActive={false} />
          <Scatter name="EMF corrected for load and temperature" data={corrected} fill={S.emfCorrected.color} shape="triangle" isAnimationActive={false} />
        </ComposedChart>
      </ResponsiveContainer>
    </div>
  );
}

/** Daily corrected Ke ratio with its interval band, the warning and alarm lines and the trend's projection. */
export function KeTrendChart({
  days,
  warn,
  alarm,
  timeZone,
  fromMs,
  toMs,
  projection,
}: {
  days: Array<{ t: number; ke: number; band: [number, number] | null }>;
  warn: number;
  alarm: number;
  timeZone: string;
  fromMs: number;
  toMs: number;
  projection: { fromT: number; level: number; crossT: number; earliestT?: number; latestT?: number } | undefined;
}) {
  const lows = days.map((d) => d.band?.[0] ?? d.ke);
  const highs = days.map((d) => d.band?.[1] ?? d.ke);
  const yMin = Math.min(alarm - 0.02, ...lows);
  const yMax = Math.max(1.03, ...highs);
  return (
    <div className="chart-box" data-testid="ke-chart">
      <ResponsiveContainer width="100%" height="100%">
        <ComposedChart data={days} margin={{ top: 10, right: 16, bottom: 28, left: 8 }}>
          <CartesianGrid stroke="#e4e5e1" />
          <XAxis type="number" dataKey="t" scale="time" domain={[fromMs, toMs]} tickFormatter={timeTick(timeZone, toMs - fromMs)} tick={AXIS} label={{ value: 'Date (site time)', position: 'insideBottom', offset: -16, fill: '#1b2429' }} />
          <YAxis type="number" domain={[Math.floor((yMin - 0.005) * 100) / 100, Math.ceil((yMax + 0.005) * 100) / 100]} tick={AXIS} width={66} tickFormatter={(v: number) => v.toFixed(2)} label={{ value: 'Ke ratio (of nameplate)', angle: -90, position: 'insideLeft', fill: '#1b2429', style: { textAnchor: 'middle' } }} />
          <Tooltip labelFormatter={fullTime(timeZone)} formatter={(v) => (Array.isArray(v) ? v.map((x) => Number(x).toFixed(3)).join('–') : Number(v).toFixed(3))} />
          <ReferenceLine y={warn} stroke={S.keWarnLine.color} strokeDasharray={S.keWarnLine.dash} strokeWidth={S.keWarnLine.width} label={{ value: `warning ${warn}`, position: 'insideTopRight', fill: S.keWarnLine.color, fontSize: 12 }} />
          <ReferenceLine y={alarm} stroke={S.keAlarmLine.color} strokeWidth={S.keAlarmLine.width} label={{ value: `alarm ${alarm}`, position: 'insideBottomRight', fill: S.keAlarmLine.color, fontSize: 12 }} />
          <Area name="95 % interval" dataKey="band" fill={S.keInterval.color} stroke="none" fillOpacity={0.7} isAnimationActive={false} />
          <Line name="Daily median Ke ratio" dataKey="ke" stroke={S.keMedian.color} strokeWidth={S.keMedian.width} dot={{ r: 2.5, fill: S.keMedian.color }} isAnimationActive={false} />
          {projection ? (
            <ReferenceLine
              className="projection-line"
              segment={[
                { x: projection.fromT, y: projection.level },
                { x: projection.crossT, y: alarm },
              ]}
              stroke={S.keProjection.color}
              strokeDasharray={S.keProjection.dash}
              strokeWidth={S.keProjection.width}
            />
          ) : null}
          {projection?.earliestT ? (
            <ReferenceLine segment={[{ x: projection.fromT, y: projection.level }, { x: projection.earliestT, y: alarm }]} stroke={S.keProjectionInterval.color} strokeDasharray={S.keProjectionInterval.dash} strokeWidth={S.keProjectionInterval.width} />
          ) : null}
          {projection?.latestT ? (
            <ReferenceLine segment={[{ x: projection.fromT, y: projection.level }, { x: projection.latestT, y: alarm }]} stroke={S.keProjectionInterval.color} strokeDasharray={S.keProjectionInterval.dash} strokeWidth={S.keProjectionInterval.width} />
          ) : null}
        </ComposedChart>
      </ResponsiveContainer>
    </div>
  );
}

/** One time chart: a mean line per series and, where buckets hold many samples, the min–max band of the first (its legend is drawn by the panel). */
export function SeriesChart({
  rows,
  series,
  unit,
  timeZone,
  fromMs,
  toMs,
  band,
  testId,
}: {
  rows: Array<Record<string, number | [number, number] | null>>;
  series: Array<{ key: string; label: string }>;
  unit: string;
  timeZone: string;
  fromMs: number;
  toMs: number;
  /** Key of a [min, max] field to draw as a band. */
  band?: string;
  testId?: string;
}) {
  return (
    <div className="chart-box short" data-testid={testId}>
      <ResponsiveContainer width="100%" height="100%">
        <ComposedChart data={rows} margin={{ top: 6, right: 16, bottom: 22, left: 8 }}>
          <CartesianGrid stroke="#e4e5e1" />
          <XAxis type="number" dataKey="t" scale="time" domain={[fromMs, toMs]} tickFormatter={timeTick(timeZone, toMs - fromMs)} tick={AXIS} label={{ value: 'Site time', position: 'insideBottom', offset: -12, fill: '#1b2429', fontSize: 12 }} />
          <YAxis type="number" domain={['auto', 'auto']} tick={AXIS} width={60} label={{ value: unit, angle: -90, position: 'insideLeft', fill: '#1b2429', style: { textAnchor: 'middle' } }} />
          <Tooltip labelFormatter={fullTime(timeZone)} formatter={(v) => (Array.isArray(v) ? v.map((x) => Number(x).toFixed(1)).join('–') : Number(v).toFixed(2))} />
          {band ? <Area name="min–max" dataKey={band} fill={S.minMax.color} stroke="none" isAnimationActive={false} connectNulls /> : null}
          {series.map((s, i) => {
            const style = seriesStyle(i);
            return (
              <Line key={s.key} name={s.label} dataKey={s.key} stroke={style.stroke} strokeDasharray={style.dash} strokeWidth={1.8} dot={false} isAnimationActive={false} connectNulls={false} />
            );
          })}
        </ComposedChart>
      </ResponsiveContainer>
    </div>
  );
}
