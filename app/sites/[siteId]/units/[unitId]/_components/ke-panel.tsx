import { ChartLegend, type LegendItem } from '@/app/_components/chart-legend';
import { CHART_STYLE } from '@/app/_components/chart-style';
import { KeTrendChart } from '@/app/_components/charts';
import type { KePanelView } from '@/lib/units/view-model';

const LEGEND: readonly LegendItem[] = [
  { look: CHART_STYLE.keMedian, label: 'Daily median' },
  { look: CHART_STYLE.keInterval, label: '95 % interval' },
  { look: CHART_STYLE.keProjection, label: 'Projection (dotted: its interval)' },
  { look: CHART_STYLE.keWarnLine, label: 'Warning line' },
  { look: CHART_STYLE.keAlarmLine, label: 'Alarm line' },
];

/** The corrected Ke ratio day by day, its trend and projection, in words and as a table too. */
export function KePanel({ ke, timeZone }: { ke: KePanelView; timeZone: string }) {
  return (
    <section className="panel chart-panel" aria-labelledby="ke-heading">
      <h2 id="ke-heading">Corrected Ke ratio over the weeks</h2>
      <figure>
        <ChartLegend items={LEGEND} />
        <KeTrendChart days={ke.days} warn={ke.warn} alarm={ke.alarm} timeZone={timeZone} fromMs={ke.fromMs} toMs={ke.toMs} projection={ke.projection} />
        <figcaption className="chart-summary" data-testid="ke-summary">
          {ke.summary}
        </figcaption>
        {ke.table.length > 0 ? (
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
                  {ke.table.map((d) => (
                    <tr key={d.key}>
                      <td>{d.day}</td>
                      <td className="num">{d.ke}</td>
                      <td className="num">{d.interval}</td>
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
  );
}
