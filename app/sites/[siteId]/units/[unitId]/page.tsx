import type { Metadata } from 'next';
import { notFound } from 'next/navigation';
import { loadUnitScreen } from '@/lib/units/screen';
import { SERIES_FIELDS, SERIES_RANGES, SERIES_RANGE_KEYS, type SeriesField } from '@/lib/units/queries';
import type { SeriesBucket } from '@/lib/charts/downsample';
import { SAFETY_CAUTION, splitFindingMessage } from '@/lib/diagnosis/findings';
import { findingTitle, VERDICT_BASIS } from '@/lib/diagnosis/vocabulary';
import type { UnitState } from '@/lib/fleet/unit-state';
import { StateBadge, StateIcon } from '@/app/_components/state-badge';
import { LocalTime } from '@/app/_components/local-time';
import { EmfScatter, KeTrendChart, SeriesChart } from '@/app/_components/charts';
import { ago, formatNumber, formatRatio } from '@/app/_components/format';
import { LiveUpdates } from '@/app/_components/live-updates';
import { seriesStyle } from '@/app/_components/chart-style';

export const dynamic = 'force-dynamic';

type Props = {
  params: Promise<{ siteId: string; unitId: string }>;
  searchParams: Promise<Record<string, string | string[] | undefined>>;
};

export async function generateMetadata({ params }: Props): Promise<Metadata> {
  const { unitId } = await params;
  return { title: `Unit ${unitId}` };
}

const SEVERITY_STATE: Record<string, UnitState> = { alarm: 'fault', warning: 'warning', info: 'not-judged' };
const SEVERITY_WORD: Record<string, string> = { alarm: 'Alarm', warning: 'Warning', info: 'Note' };

/** Which fields each time chart draws (the rollups keep the means of three lines and phases, not each). */
function chartGroups(kind: 'wind' | 'hydro', raw: boolean) {
  const resource = kind === 'wind' ? { title: 'Wind speed', unit: 'm/s' } : { title: 'Water flow', unit: 'm³/s' };
  return raw
    ? [
        { title: 'Speed', unit: 'rpm', fields: ['rpm'] as SeriesField[] },
        { title: 'Frequency', unit: 'Hz', fields: ['hz'] as SeriesField[] },
        { title: 'Line voltages', unit: 'V', fields: ['vab', 'vbc', 'vca'] as SeriesField[] },
        { title: 'Phase currents', unit: 'A', fields: ['ia', 'ib', 'ic'] as SeriesField[] },
        { title: 'Power', unit: 'kW', fields: ['kw'] as SeriesField[] },
        { title: 'Temperatures', unit: '°C', fields: ['statorC', 'ambientC'] as SeriesField[] },
        { ...resource, fields: ['resource'] as SeriesField[] },
      ]
    : [
        { title: 'Speed', unit: 'rpm', fields: ['rpm'] as SeriesField[] },
        { title: 'Line voltage (mean of the lines)', unit: 'V', fields: ['vll'] as SeriesField[] },
        { title: 'Current (mean of the phases)', unit: 'A', fields: ['amps'] as SeriesField[] },
        { title: 'Power', unit: 'kW', fields: ['kw'] as SeriesField[] },
        { title: 'Stator temperature', unit: '°C', fields: ['statorC'] as SeriesField[] },
        { ...resource, fields: ['resource'] as SeriesField[] },
      ];
}

/** Rows for one chart: the fields' bucket means side by side by time, and the first field's min–max band; a gap in the data stays a gap. */
function mergeRows(series: Partial<Record<SeriesField, SeriesBucket[]>>, fields: SeriesField[], withBand: boolean) {
  const byT = new Map<number, Record<string, number | [number, number] | null>>();
  fields.forEach((f, i) => {
    for (const b of series[f] ?? []) {
      const t = Math.round(b.t);
      const row = byT.get(t) ?? { t };
      row[f] = b.mean;
      if (withBand && i === 0) row.band = [b.min, b.max];
      byT.set(t, row);
    }
  });
  const rows = [...byT.values()].sort((a, b) => (a.t as number) - (b.t as number));
  // A gap: longer than the contract's 10 minutes and than five typical steps. A row of nulls breaks the line there.
  const steps = rows.slice(1).map((r, i) => (r.t as number) - (rows[i]!.t as number)).sort((a, b) => a - b);
  const typical = steps[Math.floor(steps.length / 2)] ?? 0;
  const gapMs = Math.max(10 * 60_000, 5 * typical);
  const out: typeof rows = [];
  for (const r of rows) {
    const prev = out.at(-1);
    if (prev && (r.t as number) - (prev.t as number) > gapMs) {
      out.push({ t: (prev.t as number) + 1, ...Object.fromEntries([...fields, 'band'].map((f) => [f, null])) });
    }
    out.push(r);
  }
  return out;
}

function stats(buckets: SeriesBucket[]) {
  let min = Infinity;
  let max = -Infinity;
  let sum = 0;
  let n = 0;
  for (const b of buckets) {
    min = Math.min(min, b.min);
    max = Math.max(max, b.max);
    sum += b.mean * b.count;
    n += b.count;
  }
  return { min, max, mean: sum / n, n };
}

export default async function UnitPage({ params, searchParams }: Props) {
  const { siteId, unitId } = await params;
  const search = await searchParams;
  const screen = await loadUnitScreen(siteId, unitId, search.range);
  if (screen === undefined) notFound();
  const { view, emf, ke, series, nowMs } = screen;
  const { unit, site, nameplate, limits, health } = view;
  const now = new Date(nowMs);
  const tz = site.timezone;

  const terminal = emf.points.map((p) => ({ rpm: p.rpm, v: p.terminalV }));
  const corrected = emf.points.filter((p) => p.correctedV !== undefined).map((p) => ({ rpm: p.rpm, v: p.correctedV as number }));
  // Speed bins for the chart's table: mean terminal and corrected voltage against the nameplate line.
  const binCount = 8;
  const speeds = emf.points.map((p) => p.rpm);
  const lo = Math.min(...speeds);
  const hi = Math.max(...speeds);
  const bins =
    emf.points.length === 0
      ? []
      : Array.from({ length: binCount }, (_, i) => {
          const a = lo + ((hi - lo) * i) / binCount;
          const b = lo + ((hi - lo) * (i + 1)) / binCount;
          const inBin = emf.points.filter((p) => p.rpm >= a && (i === binCount - 1 ? p.rpm <= b : p.rpm < b));
          const withCorr = inBin.filter((p) => p.correctedV !== undefined);
          const mid = (a + b) / 2;
          return {
            from: a,
            to: b,
            n: inBin.length,
            terminal: inBin.length ? inBin.reduce((s, p) => s + p.terminalV, 0) / inBin.length : null,
            corrected: withCorr.length ? withCorr.reduce((s, p) => s + (p.correctedV as number), 0) / withCorr.length : null,
            nameplate: (emf.lineKeVPerKrpm * mid) / 1000,
          };
        }).filter((b) => b.n > 0);

  const trend = ke.trend;
  const lastDay = ke.days.at(-1);
  const projection =
    trend.crossingMs !== undefined && trend.level !== undefined && lastDay
      ? { fromT: lastDay.t, level: trend.level, crossT: trend.crossingMs, earliestT: trend.crossingEarliestMs, latestT: trend.crossingLatestMs }
      : undefined;
  const keToMs = Math.min(Math.max(nowMs, projection?.latestT ?? projection?.crossT ?? nowMs), nowMs + 2 * 365 * 86_400_000);
  const keFromMs = ke.days[0]?.t !== undefined ? Math.min(ke.days[0].t, nowMs - 14 * 86_400_000) : nowMs - 14 * 86_400_000;
  const dateOnly = new Intl.DateTimeFormat('en-GB', { timeZone: tz, day: 'numeric', month: 'short', year: 'numeric' });

  const raw = series.source === 'raw';
  const groups = chartGroups(unit.kind, raw).filter((g) => g.fields.some((f) => (series.series[f]?.length ?? 0) > 0));
  const sourceText = raw ? 'raw samples' : series.source === 'rollup-10m' ? '10-minute rollups' : 'daily rollups';
  const findings = health?.findings ?? [];
  const anyCaution = findings.some((f) => splitFindingMessage(f.message).caution);

  return (
    <>
      <nav className="breadcrumbs" aria-label="Breadcrumbs">
        <ol>
          <li>
            <a href="/">Fleet</a>
          </li>
          <li>
            <a href={`/sites/${site.id}`}>{site.name}</a>
          </li>
          <li aria-current="page">{unit.id}</li>
        </ol>
      </nav>
      <div className="page-head">
        <div>
          <h1>
            <span className="unit-id">{unit.id}</span>
            {unit.name ? <span className="muted"> {unit.name}</span> : null}
          </h1>
          <p>
            <StateBadge state={view.state.state} label={view.state.label} />{' '}
            <span className="note">
              {unit.kind === 'wind' ? 'Wind' : 'Hydro'}, {formatNumber(unit.ratedKw, 0, 'kW')} rated · last sample{' '}
              {view.lastSampleMs === null ? (
                'never'
              ) : (
                <>
                  <LocalTime time={new Date(view.lastSampleMs)} timeZone={tz} now={now} /> ({ago(new Date(view.lastSampleMs), now)})
                </>
              )}
            </span>
          </p>
          {view.state.reason && (view.state.state === 'no-data' || health === undefined) ? <p data-testid="unit-reason">{view.state.reason}</p> : null}
        </div>
        <LiveUpdates siteId={site.id} unitId={unit.id} unitNames={{ [unit.id]: unit.name ?? unit.id }} />
      </div>

      <section className={`panel ${view.state.state === 'fault' ? 'panel-fault' : view.state.state === 'warning' ? 'panel-warning' : ''}`} aria-labelledby="findings-heading" data-testid="findings">
        <h2 id="findings-heading">What the diagnosis found</h2>
        {health === undefined ? (
          <p>
            Not yet judged: the live diagnosis runs once the unit has sent samples; it needs at least {limits.minSamples} samples above{' '}
            {formatNumber(limits.minSpeedFraction * unit.ratedRpm, 0, 'rpm')}.
          </p>
        ) : (
          <>
            <p className="note" data-testid="diagnosed-when">
              Diagnosed <LocalTime time={new Date(health.diagnosedAtMs)} timeZone={tz} now={now} /> ({ago(new Date(health.diagnosedAtMs), now)}) from the
              samples of <LocalTime time={new Date(health.windowFromMs)} timeZone={tz} now={now} /> to{' '}
              <LocalTime time={new Date(health.windowToMs)} timeZone={tz} now={now} />; {formatNumber(health.samplesUsed)} samples used.{' '}
              {VERDICT_BASIS[health.verdict as keyof typeof VERDICT_BASIS] ? `Verdict rests on: ${VERDICT_BASIS[health.verdict as keyof typeof VERDICT_BASIS]}.` : null}
            </p>
            <ul className="findings">
              {findings.map((f, i) => {
                const { observation, nextSteps, caution } = splitFindingMessage(f.message);
                return (
                  <li key={i} data-code={f.code} data-severity={f.severity}>
                    <p className="finding-head">
                      <StateIcon state={SEVERITY_STATE[f.severity] ?? 'not-judged'} />
                      <strong>
                        {SEVERITY_WORD[f.severity] ?? f.severity}: {findingTitle(f.code)}.
                      </strong>{' '}
                      <span>{observation}</span>
                    </p>
                    {nextSteps === undefined ? null : (
                      <p className="finding-next" data-testid="next-steps">
                        <strong>Next steps:</strong> {nextSteps}
                      </p>
                    )}
                    {caution ? (
                      <p className="caution" data-testid="safety-caution">
                        {SAFETY_CAUTION}
                      </p>
                    ) : null}
                  </li>
                );
              })}
            </ul>
            {!anyCaution && view.state.state !== 'healthy' ? (
              <p className="caution" data-testid="safety-caution">
                {SAFETY_CAUTION}
              </p>
            ) : null}
          </>
        )}
      </section>

      <section className="panel chart-panel" aria-labelledby="emf-heading">
        <h2 id="emf-heading">Voltage against speed</h2>
        <figure>
          <ul className="legend" aria-hidden="true">
            <li>
              <svg width="14" height="14" viewBox="0 0 14 14">
                <polygon points="7,1 13,13 1,13" fill="#1a5fd0" />
              </svg>
              EMF corrected for load and temperature
            </li>
            <li>
              <svg width="14" height="14" viewBox="0 0 14 14">
                <circle cx="7" cy="7" r="5" fill="none" stroke="#545d63" strokeWidth="1.5" />
              </svg>
              Terminal voltage as measured
            </li>
            <li>
              <svg width="28" height="8" viewBox="0 0 28 8">
                <line x1="0" y1="4" x2="28" y2="4" stroke="#1b2429" strokeWidth="2" />
              </svg>
              Nameplate line
            </li>
            <li>
              <svg width="28" height="8" viewBox="0 0 28 8">
                <line x1="0" y1="4" x2="28" y2="4" stroke="#b0241c" strokeWidth="1.5" strokeDasharray="6 4" />
              </svg>
              Alarm line
            </li>
          </ul>
          <EmfScatter terminal={terminal} corrected={corrected} lineKeVPerKrpm={emf.lineKeVPerKrpm} alarmRatio={limits.keAlarmRatio} maxRpm={unit.maxRpm} magnetC={emf.magnetC} />
          <figcaption className="chart-summary" data-testid="emf-summary">
            {emf.points.length === 0 ? (
              <>No samples with voltage and speed in this window yet.</>
            ) : (
              <>
                {formatNumber(emf.points.length)} samples{emf.samplesRead > emf.points.length ? ` (of ${formatNumber(emf.samplesRead)}, evenly thinned)` : ''} from{' '}
                <LocalTime time={new Date(emf.fromMs)} timeZone={tz} now={now} /> to <LocalTime time={new Date(emf.toMs)} timeZone={tz} now={now} />
                {emf.diagnosisWindow ? ' (the window of the latest diagnosis)' : ''}. The solid line is the nameplate Ke moved to the magnet temperature of{' '}
                {formatNumber(emf.magnetC, 0, '°C')} ({emf.magnetSource === 'keRefC' ? 'no temperature reading: nameplate reference' : `latest ${emf.magnetSource}`}),{' '}
                {formatNumber(emf.lineKeVPerKrpm, 1)} V per 1000 rpm; the dashed red line is the alarm line at {limits.keAlarmRatio} of it. Blue triangles are the EMF
                behind the terminals, corrected for load and moved to that temperature: on a healthy unit they lie on the line
                {health?.keRatio != null ? `; the latest diagnosis puts them at ${formatRatio(health.keRatio)} of it` : ''}. Grey circles are the terminal voltage as measured.
                Samples below {formatNumber(emf.speedFloorRpm, 0, 'rpm')} carry no corrected point.
              </>
            )}
          </figcaption>
          {bins.length > 0 ? (
            <details className="chart-table">
              <summary>The same as a table</summary>
              <div className="table-scroll">
                <table>
                  <thead>
                    <tr>
                      <th scope="col">Speed, rpm</th>
                      <th scope="col" className="num">Samples</th>
                      <th scope="col" className="num">Terminal, V</th>
                      <th scope="col" className="num">Corrected EMF, V</th>
                      <th scope="col" className="num">Nameplate line, V</th>
                    </tr>
                  </thead>
                  <tbody>
                    {bins.map((b, i) => (
                      <tr key={i}>
                        <td>
                          {formatNumber(b.from)}–{formatNumber(b.to)}
                        </td>
                        <td className="num">{b.n}</td>
                        <td className="num">{formatNumber(b.terminal, 0)}</td>
                        <td className="num">{formatNumber(b.corrected, 0)}</td>
                        <td className="num">{formatNumber(b.nameplate, 0)}</td>
                      </tr>
                    ))}
                  </tbody>
                </table>
              </div>
            </details>
          ) : null}
        </figure>
      </section>

      <section className="panel chart-panel" aria-labelledby="ke-heading">
        <h2 id="ke-heading">Corrected Ke ratio over the weeks</h2>
        <figure>
          <ul className="legend" aria-hidden="true">
            <li>
              <svg width="28" height="8" viewBox="0 0 28 8">
                <line x1="0" y1="4" x2="28" y2="4" stroke="#1b2429" strokeWidth="2" />
                <circle cx="14" cy="4" r="2.5" fill="#1b2429" />
              </svg>
              Daily median
            </li>
            <li>
              <svg width="18" height="10" viewBox="0 0 18 10">
                <rect width="18" height="10" fill="#c9ccc6" />
              </svg>
              95 % interval
            </li>
            <li>
              <svg width="28" height="8" viewBox="0 0 28 8">
                <line x1="0" y1="4" x2="28" y2="4" stroke="#1a5fd0" strokeWidth="2" strokeDasharray="8 4" />
              </svg>
              Projection (dotted: its interval)
            </li>
            <li>
              <svg width="28" height="8" viewBox="0 0 28 8">
                <line x1="0" y1="4" x2="28" y2="4" stroke="#8a5000" strokeWidth="1.5" strokeDasharray="6 3" />
              </svg>
              Warning line
            </li>
            <li>
              <svg width="28" height="8" viewBox="0 0 28 8">
                <line x1="0" y1="4" x2="28" y2="4" stroke="#b0241c" strokeWidth="2" />
              </svg>
              Alarm line
            </li>
          </ul>
          <KeTrendChart
            days={ke.days.map((d) => ({ t: d.t, ke: d.ke, band: d.low !== null && d.high !== null ? [d.low, d.high] : null }))}
            warn={limits.keWarnRatio}
            alarm={limits.keAlarmRatio}
            timeZone={tz}
            fromMs={keFromMs}
            toMs={keToMs}
            projection={projection}
          />
          <figcaption className="chart-summary" data-testid="ke-summary">
            {ke.days.length === 0
              ? 'No Ke ratio yet: the history fills as the unit is diagnosed (one point a day, the median of its diagnoses).'
              : `${ke.days.length} day${ke.days.length === 1 ? '' : 's'} with a Ke ratio since ${dateOnly.format(new Date(ke.days[0]!.t))}; latest daily median ${formatRatio(lastDay?.ke)}. ` +
                (trend.status === 'insufficient'
                  ? `A trend needs at least 10 days; ${ke.days.length} so far.`
                  : `Trend: ${formatNumber(trend.slopePctPerMonth, 2)} % of nameplate a month (95 % interval ${formatNumber(trend.slopeLowPctPerMonth, 2)} to ${formatNumber(trend.slopeHighPctPerMonth, 2)}), ` +
                    (trend.status === 'declining' && trend.crossingMs !== undefined
                      ? `declining: projected to cross the alarm line ${limits.keAlarmRatio} around ${dateOnly.format(new Date(trend.crossingMs))}` +
                        (trend.crossingEarliestMs !== undefined
                          ? ` (between ${dateOnly.format(new Date(trend.crossingEarliestMs))} and ${trend.crossingLatestMs !== undefined ? dateOnly.format(new Date(trend.crossingLatestMs)) : 'no date: the slowest rate in the interval never crosses'})`
                          : '') +
                        '.'
                      : trend.status === 'below-threshold'
                        ? `already below the alarm line ${limits.keAlarmRatio}.`
                        : 'stable: no crossing projected.')) +
                ` Warning line ${limits.keWarnRatio}, alarm line ${limits.keAlarmRatio}; the grey band is the 95 % interval of each day's diagnoses.`}
          </figcaption>
          {ke.days.length > 0 ? (
            <details className="chart-table">
              <summary>The same as a table</summary>
              <div className="table-scroll">
                <table>
                  <thead>
                    <tr>
                      <th scope="col">Day</th>
                      <th scope="col" className="num">Ke ratio</th>
                      <th scope="col" className="num">95 % interval</th>
                      <th scope="col" className="num">Diagnoses</th>
                    </tr>
                  </thead>
                  <tbody>
                    {ke.days
                      .slice()
                      .reverse()
                      .map((d) => (
                        <tr key={d.t}>
                          <td>{dateOnly.format(new Date(d.t))}</td>
                          <td className="num">{formatRatio(d.ke)}</td>
                          <td className="num">{d.low !== null && d.high !== null ? `${formatRatio(d.low)}–${formatRatio(d.high)}` : '–'}</td>
                          <td className="num">{d.diagnoses}</td>
                        </tr>
                      ))}
                  </tbody>
                </table>
              </div>
            </details>
          ) : null}
        </figure>
      </section>

      <section className="panel" aria-labelledby="series-heading">
        <h2 id="series-heading">Readings over time</h2>
        <nav aria-label="Time range">
          <ul className="choice-links">
            {SERIES_RANGE_KEYS.map((r) => (
              <li key={r}>
                <a href={`?range=${r}#series-heading`} aria-current={series.range === r ? 'true' : undefined} title={SERIES_RANGES[r].label}>
                  {r}
                  <span className="visually-hidden"> ({SERIES_RANGES[r].label.toLowerCase()})</span>
                </a>
              </li>
            ))}
          </ul>
        </nav>
        {screen.problem ? (
          <p className="note" role="status">
            {screen.problem}.
          </p>
        ) : null}
        <p className="note">
          {SERIES_RANGES[series.range].label} to now, from {sourceText}
          {raw ? '' : ' (frequency and each line and phase are kept only in raw samples, for the last day)'}; {formatNumber(series.rowsRead)}{' '}
          {raw ? 'samples' : 'rollup rows'} read, shown as at most {formatNumber(1200)} points a line{raw ? '' : ', the grey band the min–max of each point'}.
        </p>
        {groups.length === 0 ? (
          <p>No readings in this range. Pick a longer range above, or check that the unit is sending samples.</p>
        ) : (
          <div className="grid series-grid">
            {groups.map((g) => {
              const withBand = !raw && g.fields.length === 1;
              const rows = mergeRows(series.series, g.fields, withBand);
              const lines = g.fields.filter((f) => (series.series[f]?.length ?? 0) > 0);
              return (
                <figure key={g.title} className="chart-panel">
                  <h3>
                    {g.title}, {g.unit}
                  </h3>
                  <ul className="legend" aria-hidden="true">
                    {lines.map((f, i) => {
                      const st = seriesStyle(i);
                      return (
                        <li key={f}>
                          <svg width="28" height="8" viewBox="0 0 28 8">
                            <line x1="0" y1="4" x2="28" y2="4" stroke={st.stroke} strokeWidth="2" strokeDasharray={st.dash} />
                          </svg>
                          {SERIES_FIELDS[f].label}
                        </li>
                      );
                    })}
                    {withBand ? (
                      <li>
                        <svg width="18" height="10" viewBox="0 0 18 10">
                          <rect width="18" height="10" fill="#d9dbd6" />
                        </svg>
                        min–max
                      </li>
                    ) : null}
                  </ul>
                  <SeriesChart
                    rows={rows}
                    series={lines.map((f) => ({ key: f, label: SERIES_FIELDS[f].label }))}
                    unit={g.unit}
                    timeZone={tz}
                    fromMs={series.fromMs}
                    toMs={series.toMs}
                    band={withBand ? 'band' : undefined}
                    testId={`series-${g.fields[0]}`}
                  />
                  <figcaption className="chart-summary">
                    {lines
                      .map((f) => {
                        const s = stats(series.series[f] as SeriesBucket[]);
                        const d = g.unit === 'rpm' || g.unit === 'V' ? 0 : 1;
                        return `${SERIES_FIELDS[f].label}: min ${formatNumber(s.min, d, g.unit)}, mean ${formatNumber(s.mean, d, g.unit)}, max ${formatNumber(s.max, d, g.unit)}`;
                      })
                      .join('; ')}
                    .
                  </figcaption>
                </figure>
              );
            })}
          </div>
        )}
      </section>

      <section className="panel" aria-labelledby="nameplate-heading">
        <h2 id="nameplate-heading">Nameplate</h2>
        <dl className="kv" data-testid="nameplate">
          <dt>Kind</dt>
          <dd>{nameplate.kind}</dd>
          <dt>Rated power</dt>
          <dd>{formatNumber(nameplate.ratedKw, 1, 'kW')}</dd>
          <dt>Rated speed</dt>
          <dd>{formatNumber(nameplate.ratedRpm, 0, 'rpm')}</dd>
          <dt>Overspeed limit</dt>
          <dd>{formatNumber(nameplate.maxRpm, 0, 'rpm')}</dd>
          <dt>Poles</dt>
          <dd>{nameplate.poles}</dd>
          <dt>Ke</dt>
          <dd>
            {formatNumber(nameplate.keVPerKrpm, 1)} V (line, RMS) per 1000 rpm at {formatNumber(nameplate.keRefC, 0, '°C')}
          </dd>
          <dt>Magnets</dt>
          <dd>
            {nameplate.magnet}
            {nameplate.magnetTempCoeffPctPerC !== undefined ? `, ${nameplate.magnetTempCoeffPctPerC} % per °C` : ''}
          </dd>
          <dt>Phase resistance</dt>
          <dd>{formatNumber(nameplate.phaseOhm, 3, 'Ω')} at 20 °C</dd>
          <dt>Phase inductance</dt>
          <dd>{formatNumber(nameplate.phaseMh, 2, 'mH')}</dd>
          {nameplate.kind === 'wind' ? (
            <>
              <dt>Cut-in / cut-out</dt>
              <dd>
                {formatNumber(nameplate.cutInMs, 1, 'm/s')} / {formatNumber(nameplate.cutOutMs, 1, 'm/s')}
              </dd>
              <dt>Rotor diameter</dt>
              <dd>{formatNumber(nameplate.rotorDiameterM, 1, 'm')}</dd>
            </>
          ) : (
            <>
              <dt>Design head and flow</dt>
              <dd>
                {formatNumber(nameplate.designHeadM, 1, 'm')}, {formatNumber(nameplate.designFlowM3s, 2, 'm³/s')}
              </dd>
              <dt>Efficiency</dt>
              <dd>{formatNumber(nameplate.efficiency, 2)}</dd>
            </>
          )}
          <dt>Diagnosis limits</dt>
          <dd>
            Ke warning {limits.keWarnRatio}, alarm {limits.keAlarmRatio}; unbalance {limits.unbalanceAlarmPct} %; speed reading ±{limits.speedRatioTolerance * 100} %
          </dd>
        </dl>
        <p className="note">
          <a href={`/setup/units/${site.id}/${unit.id}`}>Edit this unit on Setup</a>
        </p>
      </section>
    </>
  );
}
