import { ChartLegend, type LegendItem } from '@/app/_components/chart-legend';
import { CHART_STYLE, seriesLook } from '@/app/_components/chart-style';
import { SeriesChart } from '@/app/_components/charts';
import type { SeriesChartView, SeriesPanelView } from '@/lib/units/view-model';

/** A chart's legend: each line in the chart's order and style, and the min–max band when drawn. */
function legendOf(chart: SeriesChartView): LegendItem[] {
  const lines = chart.lines.map((l, i) => ({ look: seriesLook(i), label: l.label }));
  return chart.band ? [...lines, { look: CHART_STYLE.minMax, label: 'min–max' }] : lines;
}

/** Readings over time: the range links, what was read, and one chart per group of fields that has data. */
export function SeriesPanel({ series, timeZone }: { series: SeriesPanelView; timeZone: string }) {
  return (
    <section className="panel" aria-labelledby="series-heading">
      <h2 id="series-heading">Readings over time</h2>
      <nav aria-label="Time range">
        <ul className="choice-links">
          {series.ranges.map((r) => (
            <li key={r.key}>
              <a href={r.href} aria-current={r.current ? 'true' : undefined} title={r.title}>
                {r.key}
                <span className="visually-hidden">{r.spoken}</span>
              </a>
            </li>
          ))}
        </ul>
      </nav>
      {series.problem === undefined ? null : (
        <p className="note" role="status">
          {series.problem}
        </p>
      )}
      <p className="note">{series.note}</p>
      {series.empty !== undefined ? (
        <p>{series.empty}</p>
      ) : (
        <div className="grid series-grid">
          {series.charts.map((chart) => (
            <figure key={chart.heading} className="chart-panel">
              <h3>{chart.heading}</h3>
              <ChartLegend items={legendOf(chart)} />
              <SeriesChart
                rows={chart.rows}
                series={chart.lines}
                unit={chart.unit}
                timeZone={timeZone}
                fromMs={series.fromMs}
                toMs={series.toMs}
                band={chart.band ? 'band' : undefined}
                testId={chart.testId}
              />
              <figcaption className="chart-summary">{chart.summary}</figcaption>
            </figure>
          ))}
        </div>
      )}
    </section>
  );
}
