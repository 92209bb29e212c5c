import type { SeriesLook } from './chart-style';

/** One entry of a legend: a series' look (from chart-style.ts) and its name. */
export interface LegendItem {
  readonly look: SeriesLook;
  readonly label: string;
}

/**
 * The legend above a chart, drawn on the server: a swatch of each series with
 * the chart's own colour and dash or shape (so state is never told by colour
 * alone), and its name. Hidden from screen readers: the figure's caption and
 * table say the same in words.
 */
export function ChartLegend({ items }: { items: readonly LegendItem[] }) {
  return (
    <ul className="legend" aria-hidden="true">
      {items.map((item) => (
        <li key={item.label}>
          <Swatch look={item.look} />
          {item.label}
        </li>
      ))}
    </ul>
  );
}

function Swatch({ look }: { look: SeriesLook }) {
  switch (look.shape) {
    case 'triangle':
      return (
        <svg width="14" height="14" viewBox="0 0 14 14">
          <polygon points="7,1 13,13 1,13" fill={look.color} />
        </svg>
      );
    case 'ring':
      return (
        <svg width="14" height="14" viewBox="0 0 14 14">
          <circle cx="7" cy="7" r="5" fill="none" stroke={look.color} strokeWidth={look.width} />
        </svg>
      );
    case 'band':
      return (
        <svg width="18" height="10" viewBox="0 0 18 10">
          <rect width="18" height="10" fill={look.color} />
        </svg>
      );
    case 'line':
    case 'dotted-line':
      return (
        <svg width="28" height="8" viewBox="0 0 28 8">
          <line x1="0" y1="4" x2="28" y2="4" stroke={look.color} strokeWidth={look.width} strokeDasharray={look.dash} />
          {look.shape === 'dotted-line' ? <circle cx="14" cy="4" r="2.5" fill={look.color} /> : null}
        </svg>
      );
  }
}
