/**
 * Colours, dashes and shapes of the charts: the one source the client charts
 * (charts.tsx), the server-drawn legends (chart-legend.tsx) and the small marks
 * (ke-mark.tsx, sparkline.tsx) read. Lines are ink, blue, brown-orange or teal
 * (each at least 4.5:1 on white) and each has its own dash or shape, so that a
 * series differs without colour too.
 */

/** How a legend draws a series' swatch. */
export type SwatchShape = 'line' | 'dotted-line' | 'triangle' | 'ring' | 'band';

/** One series' look. `width` is the legend swatch's stroke; a chart may draw its line a little finer. */
export interface SeriesLook {
  readonly shape: SwatchShape;
  /** Stroke of a line or ring, fill of a triangle or band. */
  readonly color: string;
  readonly dash?: string;
  readonly width?: number;
}

const INK = '#1b2429';
const BLUE = '#1a5fd0';
const GREY = '#545d63';
const ALARM = '#b0241c';
const WARN = '#8a5000';

/** Every named series of the unit screen's charts, and the lines of the small marks. */
export const CHART_STYLE = {
  /** Voltage against speed: EMF corrected for load and temperature (filled triangles). */
  emfCorrected: { shape: 'triangle', color: BLUE },
  /** Voltage against speed: terminal voltage as measured (open circles). */
  emfTerminal: { shape: 'ring', color: GREY, width: 1.5 },
  /** Voltage against speed: the nameplate line at the chart's magnet temperature. */
  nameplateLine: { shape: 'line', color: INK, width: 2 },
  /** Voltage against speed: the alarm line (a fraction of the nameplate line). */
  emfAlarmLine: { shape: 'line', color: ALARM, dash: '6 4', width: 1.5 },
  /** Ke trend: the daily median, a line with dots. */
  keMedian: { shape: 'dotted-line', color: INK, width: 2 },
  /** Ke trend: the 95 % interval of each day's diagnoses. */
  keInterval: { shape: 'band', color: '#c9ccc6' },
  /** Ke trend: the projection of the robust line to the alarm line. */
  keProjection: { shape: 'line', color: BLUE, dash: '8 4', width: 2 },
  /** Ke trend: the projections of the slope's interval (drawn, not in the legend: the projection's entry names them). */
  keProjectionInterval: { shape: 'line', color: BLUE, dash: '2 3', width: 1.5 },
  /** Ke trend and Ke mark: the warning line. */
  keWarnLine: { shape: 'line', color: WARN, dash: '6 3', width: 1.5 },
  /** Ke trend and Ke mark: the alarm line. */
  keAlarmLine: { shape: 'line', color: ALARM, width: 2 },
  /** Time charts: the min–max band of each bucket. */
  minMax: { shape: 'band', color: '#d9dbd6' },
  /** Sparkline: mean power per 10 minutes. */
  sparkPower: { shape: 'line', color: '#1a4a80', width: 1.6 },
  /** Sparkline: the rated power. */
  sparkRated: { shape: 'line', color: '#d5d6d2', dash: '3 2', width: 1 },
} as const satisfies Record<string, SeriesLook>;

/** Lines of a time chart in order: the first field ink and solid, then blue, brown-orange, teal, each dashed its own way. */
export const SERIES_STYLE = [
  { stroke: INK, dash: undefined },
  { stroke: BLUE, dash: '6 3' },
  { stroke: '#a34700', dash: '2 2' },
  { stroke: '#0b6e5f', dash: '8 3 2 3' },
] as const;

/** The style of the i-th line of a chart. */
export function seriesStyle(i: number): (typeof SERIES_STYLE)[number] {
  return SERIES_STYLE[i % SERIES_STYLE.length] as (typeof SERIES_STYLE)[number];
}

/** The i-th line of a time chart as a legend swatch (its legend draws it 2 px wide, the chart 1.8). */
export function seriesLook(i: number): SeriesLook {
  const { stroke, dash } = seriesStyle(i);
  return { shape: 'line', color: stroke, dash, width: 2 };
}
