/**
 * Line styles of the charts, shared by the client charts and the server-drawn
 * legends: ink, blue, brown-orange, teal (each at least 4.5:1 on white) and
 * each with its own dash, so lines differ without colour too.
 */
export const SERIES_STYLE = [
  { stroke: '#1b2429', dash: undefined },
  { stroke: '#1a5fd0', dash: '6 3' },
  { stroke: '#a34700', dash: '2 2' },
  { stroke: '#0b6e5f', dash: '8 3 2 3' },
] as const;

/** The style of the i-th line of a chart. */
export function seriesStyle(i: number): (typeof SERIES_STYLE)[number] {
  return SERIES_STYLE[i % SERIES_STYLE.length] as (typeof SERIES_STYLE)[number];
}
