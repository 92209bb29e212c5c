/**
 * The unit screen as its panels show it: numbers binned, series merged, gaps
 * marked and every text chosen, from what the unit queries read. Pure and
 * serialisable (plain objects, numbers and strings); the panels under
 * app/sites/[siteId]/units/[unitId]/_components only lay it out.
 */
import { DEFAULT_MAX_POINTS, type SeriesBucket } from '@/lib/charts/downsample';
import { SAFETY_CAUTION, splitFindingMessage } from '@/lib/diagnosis/findings';
import type { KeTrend } from '@/lib/diagnosis/trend';
import { findingTitle, VERDICT_BASIS } from '@/lib/diagnosis/vocabulary';
import type { UnitState } from '@/lib/fleet/unit-state';
import { ago, formatNumber, formatRatio } from '@/lib/text/format';
import { emfBins } from './emf-bins';
import { keProjection, keWindow, type KeProjection } from './ke-window';
import { SERIES_FIELDS, SERIES_RANGE_KEYS, SERIES_RANGES, type KeDay, type SeriesField, type SeriesRange, type UnitEmfView, type UnitSeries, type UnitView } from './queries';
import { mergeSeriesRows, seriesGroups, seriesStats, type SeriesRow } from './series-charts';

/** The page head: the unit's state, what it is and when it last sent. */
export interface UnitHeadView {
  readonly state: UnitState;
  readonly stateLabel: string;
  /** "Wind, 10 kW rated · last sample" */
  readonly summary: string;
  /** The last sample's time (null: never) and how long ago, or 'never'. */
  readonly lastSample: { readonly atMs: number | null; readonly ago: string };
  /** Why the unit is not judged, when that is its state. */
  readonly reason: string | undefined;
}

/** One finding as the findings panel lists it. */
export interface FindingItemView {
  readonly code: string;
  readonly severity: string;
  /** The state whose icon the finding carries. */
  readonly icon: UnitState;
  /** "Alarm: Magnets weakened." */
  readonly heading: string;
  readonly observation: string;
  readonly nextSteps: string | undefined;
  /** The safety caution, when the finding sends someone to the machine. */
  readonly caution: string | undefined;
}

/** What the diagnosis found, or why there is nothing yet. */
export type FindingsView =
  | { readonly kind: 'not-judged'; readonly state: UnitState; readonly text: string }
  | {
      readonly kind: 'judged';
      readonly state: UnitState;
      readonly diagnosedAtMs: number;
      readonly diagnosedAgo: string;
      readonly windowFromMs: number;
      readonly windowToMs: number;
      /** "1,234 samples used." */
      readonly samplesUsed: string;
      /** "Verdict rests on: …." when the verdict is one we know. */
      readonly basis: string | undefined;
      readonly items: readonly FindingItemView[];
      /** The safety caution at the foot, when no finding carries it and the unit is not healthy. */
      readonly closingCaution: string | undefined;
    };

/** One speed bin of the voltage table, as text. */
export interface EmfTableRow {
  readonly key: string;
  readonly speed: string;
  readonly samples: string;
  readonly terminal: string;
  readonly corrected: string;
  readonly nameplate: string;
}

/** One day of the Ke table, as text. */
export interface KeTableRow {
  readonly key: string;
  readonly day: string;
  readonly ke: string;
  readonly interval: string;
  readonly diagnoses: string;
}

/** The voltage-against-speed panel. */
export interface EmfPanelView {
  /** The chart's points (arrays as the chart library takes them). */
  readonly terminal: Array<{ rpm: number; v: number }>;
  readonly corrected: Array<{ rpm: number; v: number }>;
  readonly lineKeVPerKrpm: number;
  readonly alarmRatio: number;
  readonly maxRpm: number;
  readonly magnetC: number;
  /** The caption: a sentence, or the words around the window's two times. */
  readonly summary: { readonly kind: 'empty'; readonly text: string } | { readonly kind: 'drawn'; readonly lead: string; readonly fromMs: number; readonly toMs: number; readonly rest: string };
  /** The speed bins (lib/units/emf-points.ts `emfBins`) as table rows. */
  readonly table: readonly EmfTableRow[];
}

/** The Ke trend panel. */
export interface KePanelView {
  readonly days: Array<{ t: number; ke: number; band: [number, number] | null }>;
  readonly warn: number;
  readonly alarm: number;
  readonly fromMs: number;
  readonly toMs: number;
  readonly projection: KeProjection | undefined;
  readonly summary: string;
  /** Newest day first. */
  readonly table: readonly KeTableRow[];
}

/** One time chart of the readings panel. */
export interface SeriesChartView {
  /** "Speed, rpm" */
  readonly heading: string;
  readonly unit: string;
  readonly testId: string;
  /** The lines drawn, in order (the legend's and the chart's styles go by this order). */
  readonly lines: Array<{ key: SeriesField; label: string }>;
  /** Whether the first line's min–max band is drawn (rollups, one field). */
  readonly band: boolean;
  readonly rows: SeriesRow[];
  /** "Speed: min 57 rpm, mean 138 rpm, max 234 rpm." */
  readonly summary: string;
}

/** The readings-over-time panel. */
export interface SeriesPanelView {
  readonly ranges: ReadonlyArray<{ readonly key: SeriesRange; readonly href: string; readonly title: string; readonly spoken: string; readonly current: boolean }>;
  /** A range parameter that could not be used, as a sentence. */
  readonly problem: string | undefined;
  readonly note: string;
  /** What to say when no chart has data. */
  readonly empty: string | undefined;
  readonly fromMs: number;
  readonly toMs: number;
  readonly charts: readonly SeriesChartView[];
}

/** The nameplate panel: terms and their values, and where to edit them. */
export interface NameplateView {
  readonly rows: ReadonlyArray<{ readonly term: string; readonly detail: string }>;
  readonly editHref: string;
}

const SEVERITY_STATE: Record<string, UnitState> = { alarm: 'fault', warning: 'warning', info: 'not-judged' };
const SEVERITY_WORD: Record<string, string> = { alarm: 'Alarm', warning: 'Warning', info: 'Note' };

/** The page head of a unit. */
export function unitHeadView(view: UnitView, nowMs: number): UnitHeadView {
  const { unit, health, state } = view;
  return {
    state: state.state,
    stateLabel: state.label,
    summary: `${unit.kind === 'wind' ? 'Wind' : 'Hydro'}, ${formatNumber(unit.ratedKw, 0, 'kW')} rated · last sample`,
    lastSample: { atMs: view.lastSampleMs, ago: ago(view.lastSampleMs === null ? null : new Date(view.lastSampleMs), new Date(nowMs)) },
    reason: state.reason && (state.state === 'no-data' || health === undefined) ? state.reason : undefined,
  };
}

/** The findings panel: the latest diagnosis's findings split into what was seen, the next steps and the caution. */
export function findingsView(view: UnitView, nowMs: number): FindingsView {
  const { unit, limits, health, state } = view;
  if (health === undefined) {
    return {
      kind: 'not-judged',
      state: state.state,
      text: `Not yet judged: the live diagnosis runs once the unit has sent samples; it needs at least ${limits.minSamples} samples above ${formatNumber(limits.minSpeedFraction * unit.ratedRpm, 0, 'rpm')}.`,
    };
  }
  const items = health.findings.map((f): FindingItemView => {
    const { observation, nextSteps, caution } = splitFindingMessage(f.message);
    return {
      code: f.code,
      severity: f.severity,
      icon: SEVERITY_STATE[f.severity] ?? 'not-judged',
      heading: `${SEVERITY_WORD[f.severity] ?? f.severity}: ${findingTitle(f.code)}.`,
      observation,
      nextSteps,
      caution: caution ? SAFETY_CAUTION : undefined,
    };
  });
  const basis = (VERDICT_BASIS as Record<string, string | undefined>)[health.verdict];
  return {
    kind: 'judged',
    state: state.state,
    diagnosedAtMs: health.diagnosedAtMs,
    diagnosedAgo: ago(new Date(health.diagnosedAtMs), new Date(nowMs)),
    windowFromMs: health.windowFromMs,
    windowToMs: health.windowToMs,
    samplesUsed: `${formatNumber(health.samplesUsed)} samples used.`,
    basis: basis ? `Verdict rests on: ${basis}.` : undefined,
    items,
    closingCaution: !items.some((i) => i.caution !== undefined) && state.state !== 'healthy' ? SAFETY_CAUTION : undefined,
  };
}

/** The voltage-against-speed panel: the points, the caption and the speed bins. */
export function emfPanelView(view: UnitView, emf: UnitEmfView): EmfPanelView {
  const { limits, health } = view;
  const magnet = emf.magnetSource === 'keRefC' ? 'no temperature reading: nameplate reference' : `latest ${emf.magnetSource}`;
  const summary: EmfPanelView['summary'] =
    emf.points.length === 0
      ? { kind: 'empty', text: 'No samples with voltage and speed in this window yet.' }
      : {
          kind: 'drawn',
          lead: `${formatNumber(emf.points.length)} samples${emf.samplesRead > emf.points.length ? ` (of ${formatNumber(emf.samplesRead)}, evenly thinned)` : ''} from`,
          fromMs: emf.fromMs,
          toMs: emf.toMs,
          rest:
            `${emf.diagnosisWindow ? ' (the window of the latest diagnosis)' : ''}. The solid line is the nameplate Ke moved to the magnet temperature of ` +
            `${formatNumber(emf.magnetC, 0, '°C')} (${magnet}), ${formatNumber(emf.lineKeVPerKrpm, 1)} V per 1000 rpm; ` +
            `the dashed red line is the alarm line at ${limits.keAlarmRatio} of it. Blue triangles are the EMF behind the terminals, corrected for load and moved to that temperature: ` +
            `on a healthy unit they lie on the line${health?.keRatio != null ? `; the latest diagnosis puts them at ${formatRatio(health.keRatio)} of it` : ''}. ` +
            `Grey circles are the terminal voltage as measured. Samples below ${formatNumber(emf.speedFloorRpm, 0, 'rpm')} carry no corrected point.`,
        };
  return {
    terminal: emf.points.map((p) => ({ rpm: p.rpm, v: p.terminalV })),
    corrected: emf.points.flatMap((p) => (p.correctedV === undefined ? [] : [{ rpm: p.rpm, v: p.correctedV }])),
    lineKeVPerKrpm: emf.lineKeVPerKrpm,
    alarmRatio: limits.keAlarmRatio,
    maxRpm: view.unit.maxRpm,
    magnetC: emf.magnetC,
    summary,
    table: emfBins(emf.points, emf.lineKeVPerKrpm).map((b, i) => ({
      key: String(i),
      speed: `${formatNumber(b.from)}–${formatNumber(b.to)}`,
      samples: String(b.n),
      terminal: formatNumber(b.terminalV, 0),
      corrected: formatNumber(b.correctedV, 0),
      nameplate: formatNumber(b.nameplateV, 0),
    })),
  };
}

/** "12 Mar 2026" in the site's zone. */
function dateOnly(timeZone: string): (t: number) => string {
  const f = new Intl.DateTimeFormat('en-GB', { timeZone, day: 'numeric', month: 'short', year: 'numeric' });
  return (t) => f.format(new Date(t));
}

/** What the trend says after the days' count: too few days, declining to a date, already below, or stable. */
function trendWords(trend: KeTrend, days: number, alarm: number, date: (t: number) => string): string {
  if (trend.status === 'insufficient') return `A trend needs at least 10 days; ${days} so far.`;
  const slope = `Trend: ${formatNumber(trend.slopePctPerMonth, 2)} % of nameplate a month (95 % interval ${formatNumber(trend.slopeLowPctPerMonth, 2)} to ${formatNumber(trend.slopeHighPctPerMonth, 2)}), `;
  if (trend.status === 'declining' && trend.crossingMs !== undefined) {
    const between =
      trend.crossingEarliestMs === undefined
        ? ''
        : ` (between ${date(trend.crossingEarliestMs)} and ${trend.crossingLatestMs !== undefined ? date(trend.crossingLatestMs) : 'no date: the slowest rate in the interval never crosses'})`;
    return `${slope}declining: projected to cross the alarm line ${alarm} around ${date(trend.crossingMs)}${between}.`;
  }
  return slope + (trend.status === 'below-threshold' ? `already below the alarm line ${alarm}.` : 'stable: no crossing projected.');
}

/** The Ke trend panel: the daily ratios, the projection and its window, the caption and the table. */
export function kePanelView(view: UnitView, ke: { days: readonly KeDay[]; trend: KeTrend }, nowMs: number): KePanelView {
  const { keWarnRatio: warn, keAlarmRatio: alarm } = view.limits;
  const { days, trend } = ke;
  const date = dateOnly(view.site.timezone);
  const projection = keProjection(trend, days.at(-1)?.t);
  const first = days[0];
  const summary =
    first === undefined
      ? 'No Ke ratio yet: the history fills as the unit is diagnosed (one point a day, the median of its diagnoses).'
      : `${days.length} day${days.length === 1 ? '' : 's'} with a Ke ratio since ${date(first.t)}; latest daily median ${formatRatio(days.at(-1)?.ke)}. ` +
        trendWords(trend, days.length, alarm, date) +
        ` Warning line ${warn}, alarm line ${alarm}; the grey band is the 95 % interval of each day's diagnoses.`;
  return {
    days: days.map((d) => ({ t: d.t, ke: d.ke, band: d.low !== null && d.high !== null ? [d.low, d.high] : null })),
    warn,
    alarm,
    ...keWindow({ firstDayT: first?.t, projection, nowMs }),
    projection,
    summary,
    table: days
      .slice()
      .reverse()
      .map((d) => ({
        key: String(d.t),
        day: date(d.t),
        ke: formatRatio(d.ke),
        interval: d.low !== null && d.high !== null ? `${formatRatio(d.low)}–${formatRatio(d.high)}` : '–',
        diagnoses: String(d.diagnoses),
      })),
  };
}

/** Where a range's series come from, in words. */
const SOURCE_WORDS: Record<UnitSeries['source'], string> = { raw: 'raw samples', 'rollup-10m': '10-minute rollups', 'rollup-daily': 'daily rollups' };

/** One chart's caption: each line's min, mean and max; whole numbers for speed and voltage. */
function seriesSummary(series: UnitSeries['series'], lines: readonly SeriesField[], unit: string): string {
  const digits = unit === 'rpm' || unit === 'V' ? 0 : 1;
  const parts = lines.map((f) => {
    const s = seriesStats((series[f] ?? []) as SeriesBucket[]);
    return `${SERIES_FIELDS[f].label}: min ${formatNumber(s?.min, digits, unit)}, mean ${formatNumber(s?.mean, digits, unit)}, max ${formatNumber(s?.max, digits, unit)}`;
  });
  return `${parts.join('; ')}.`;
}

/** The readings panel: the range links, what was read, and each chart that has data, its rows merged with gaps marked. */
export function seriesPanelView(view: UnitView, series: UnitSeries, problem: string | undefined): SeriesPanelView {
  const raw = series.source === 'raw';
  const has = (f: SeriesField) => (series.series[f]?.length ?? 0) > 0;
  const charts = seriesGroups(view.unit.kind, raw)
    .filter((g) => g.fields.some(has))
    .map((g): SeriesChartView => {
      const band = !raw && g.fields.length === 1;
      const lines = g.fields.filter(has);
      return {
        heading: `${g.title}, ${g.unit}`,
        unit: g.unit,
        testId: `series-${g.fields[0]}`,
        lines: lines.map((f) => ({ key: f, label: SERIES_FIELDS[f].label })),
        band,
        rows: mergeSeriesRows(series.series, g.fields, band),
        summary: seriesSummary(series.series, lines, g.unit),
      };
    });
  return {
    ranges: SERIES_RANGE_KEYS.map((r) => ({
      key: r,
      href: `?range=${r}#series-heading`,
      title: SERIES_RANGES[r].label,
      spoken: ` (${SERIES_RANGES[r].label.toLowerCase()})`,
      current: series.range === r,
    })),
    problem: problem === undefined ? undefined : `${problem}.`,
    note:
      `${SERIES_RANGES[series.range].label} to now, from ${SOURCE_WORDS[series.source]}` +
      `${raw ? '' : ' (frequency and each line and phase are kept only in raw samples, for the last day)'}; ${formatNumber(series.rowsRead)} ` +
      `${raw ? 'samples' : 'rollup rows'} read, shown as at most ${formatNumber(DEFAULT_MAX_POINTS)} points a line${raw ? '' : ', the grey band the min–max of each point'}.`,
    empty: charts.length === 0 ? 'No readings in this range. Pick a longer range above, or check that the unit is sending samples.' : undefined,
    fromMs: series.fromMs,
    toMs: series.toMs,
    charts,
  };
}

/** The nameplate panel: every field with its unit, the kind's own fields, and the diagnosis limits in force. */
export function nameplateView(view: UnitView): NameplateView {
  const { nameplate: np, limits } = view;
  const kindRows =
    np.kind === 'wind'
      ? [
          { term: 'Cut-in / cut-out', detail: `${formatNumber(np.cutInMs, 1, 'm/s')} / ${formatNumber(np.cutOutMs, 1, 'm/s')}` },
          { term: 'Rotor diameter', detail: formatNumber(np.rotorDiameterM, 1, 'm') },
        ]
      : [
          { term: 'Design head and flow', detail: `${formatNumber(np.designHeadM, 1, 'm')}, ${formatNumber(np.designFlowM3s, 2, 'm³/s')}` },
          { term: 'Efficiency', detail: formatNumber(np.efficiency, 2) },
        ];
  return {
    rows: [
      { term: 'Kind', detail: np.kind },
      { term: 'Rated power', detail: formatNumber(np.ratedKw, 1, 'kW') },
      { term: 'Rated speed', detail: formatNumber(np.ratedRpm, 0, 'rpm') },
      { term: 'Overspeed limit', detail: formatNumber(np.maxRpm, 0, 'rpm') },
      { term: 'Poles', detail: String(np.poles) },
      { term: 'Ke', detail: `${formatNumber(np.keVPerKrpm, 1)} V (line, RMS) per 1000 rpm at ${formatNumber(np.keRefC, 0, '°C')}` },
      { term: 'Magnets', detail: `${np.magnet}${np.magnetTempCoeffPctPerC !== undefined ? `, ${np.magnetTempCoeffPctPerC} % per °C` : ''}` },
      { term: 'Phase resistance', detail: `${formatNumber(np.phaseOhm, 3, 'Ω')} at 20 °C` },
      { term: 'Phase inductance', detail: formatNumber(np.phaseMh, 2, 'mH') },
      ...kindRows,
      {
        term: 'Diagnosis limits',
        detail: `Ke warning ${limits.keWarnRatio}, alarm ${limits.keAlarmRatio}; unbalance ${limits.unbalanceAlarmPct} %; speed reading ±${limits.speedRatioTolerance * 100} %`,
      },
    ],
    editHref: `/setup/units/${view.site.id}/${view.unit.id}`,
  };
}
