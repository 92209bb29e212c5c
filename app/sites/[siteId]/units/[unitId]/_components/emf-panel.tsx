import { ChartLegend, type LegendItem } from '@/app/_components/chart-legend';
import { CHART_STYLE } from '@/app/_components/chart-style';
import { EmfScatter } from '@/app/_components/charts';
import { LocalTime } from '@/app/_components/local-time';
import type { EmfPanelView } from '@/lib/units/view-model';

const LEGEND: readonly LegendItem[] = [
  { look: CHART_STYLE.emfCorrected, label: 'EMF corrected for load and temperature' },
  { look: CHART_STYLE.emfTerminal, label: 'Terminal voltage as measured' },
  { look: CHART_STYLE.nameplateLine, label: 'Nameplate line' },
  { look: CHART_STYLE.emfAlarmLine, label: 'Alarm line' },
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
                  {emf.table.map((b) => (
                    <tr key={b.key}>
                      <td>{b.speed}</td>
                      <td className="num">{b.samples}</td>
                      <td className="num">{b.terminal}</td>
                      <td className="num">{b.corrected}</td>
                      <td className="num">{b.nameplate}</td>
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
