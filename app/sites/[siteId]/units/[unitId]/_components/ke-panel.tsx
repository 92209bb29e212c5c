import { ChartLegend, type LegendItem } from '@/app/_components/chart-legend';
import { CHART_STYLE } from '@/app/_components/chart-style';
import { KeTrendChart } from '@/app/_components/charts';
import type { KePanelView } from '@/lib/units/view-model';
import { ChartTable, type TableColumn } from './chart-table';

const LEGEND: readonly LegendItem[] = [
  { look: CHART_STYLE.keMedian, label: 'Daily median' },
  { look: CHART_STYLE.keInterval, label: '95 % interval' },
  { look: CHART_STYLE.keProjection, label: 'Projection (dotted: its interval)' },
  { look: CHART_STYLE.keWarnLine, label: 'Warning line' },
  { look: CHART_STYLE.keAlarmLine, label: 'Alarm line' },
];

const COLUMNS: readonly TableColumn[] = [{ label: 'Day' }, { label: 'Ke ratio', num: true }, { label: '95 % interval', num: true }, { label: 'Diagnoses', num: true }];

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
        {ke.table.length > 0 ? <ChartTable columns={COLUMNS} rows={ke.table.map((d) => ({ key: d.key, cells: [d.day, d.ke, d.interval, d.diagnoses] }))} /> : null}
      </figure>
    </section>
  );
}
