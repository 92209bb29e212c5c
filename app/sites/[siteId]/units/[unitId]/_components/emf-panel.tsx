import { ChartLegend, type LegendItem } from '@/app/_components/chart-legend';
import { CHART_STYLE } from '@/app/_components/chart-style';
import { EmfScatter } from '@/app/_components/charts';
import { LocalTime } from '@/app/_components/local-time';
import type { EmfPanelView } from '@/lib/units/view-model';
import { ChartTable, type TableColumn } from './chart-table';

const LEGEND: readonly LegendItem[] = [
  { look: CHART_STYLE.emfCorrected, label: 'EMF corrected for load and temperature' },
  { look: CHART_STYLE.emfTerminal, label: 'Terminal voltage as measured' },
  { look: CHART_STYLE.nameplateLine, label: 'Nameplate line' },
  { look: CHART_STYLE.emfAlarmLine, label: 'Alarm line' },
];

const COLUMNS: readonly TableColumn[] = [
  { label: 'Speed, rpm' },
  { label: 'Samples', num: true },
  { label: 'Terminal, V', num: true },
  { label: 'Corrected EMF, V', num: true },
  { label: 'Nameplate line, V', num: true },
];

/** The evidence: terminal voltage and corrected EMF against speed beside the nameplate line, in words and as a table too. */
export function EmfPanel({ emf, timeZone, nowMs }: { emf: EmfPanelView; timeZone: string; nowMs: number }) {
  const { summary } = emf;
  return (
    <section className="panel chart-panel" aria-labelledby="emf-heading">
      <h2 id="emf-heading">Voltage against speed</h2>
      <figure>
        <ChartLegend items={LEGEND} />
        <EmfScatter terminal={emf.terminal} corrected={emf.corrected} lineKeVPerKrpm={emf.lineKeVPerKrpm} alarmRatio={emf.alarmRatio} maxRpm={emf.maxRpm} magnetC={emf.magnetC} />
        <figcaption className="chart-summary" data-testid="emf-summary">
          {summary.kind === 'empty' ? (
            summary.text
          ) : (
            <>
              {summary.lead} <LocalTime time={new Date(summary.fromMs)} timeZone={timeZone} now={new Date(nowMs)} /> to{' '}
              <LocalTime time={new Date(summary.toMs)} timeZone={timeZone} now={new Date(nowMs)} />
              {summary.rest}
            </>
          )}
        </figcaption>
        {emf.table.length > 0 ? (
          <ChartTable columns={COLUMNS} rows={emf.table.map((b) => ({ key: b.key, cells: [b.speed, b.samples, b.terminal, b.corrected, b.nameplate] }))} />
        ) : null}
      </figure>
    </section>
  );
}
