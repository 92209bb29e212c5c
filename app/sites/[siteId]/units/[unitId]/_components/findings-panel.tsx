import { LocalTime } from '@/app/_components/local-time';
import { StateIcon } from '@/app/_components/state-badge';
import type { FindingsView } from '@/lib/units/view-model';

const TONE: Partial<Record<FindingsView['state'], string>> = { fault: 'panel-fault', warning: 'panel-warning' };

/** What the latest diagnosis found: when and over which samples, each finding with its next steps, and the safety caution. */
export function FindingsPanel({ findings, timeZone, nowMs }: { findings: FindingsView; timeZone: string; nowMs: number }) {
  const now = new Date(nowMs);
  return (
    <section className={`panel ${TONE[findings.state] ?? ''}`} aria-labelledby="findings-heading" data-testid="findings">
      <h2 id="findings-heading">What the diagnosis found</h2>
      {findings.kind === 'not-judged' ? (
        <p>{findings.text}</p>
      ) : (
        <>
          <p className="note" data-testid="diagnosed-when">
            Diagnosed <LocalTime time={new Date(findings.diagnosedAtMs)} timeZone={timeZone} now={now} /> ({findings.diagnosedAgo}) from the samples of{' '}
            <LocalTime time={new Date(findings.windowFromMs)} timeZone={timeZone} now={now} /> to <LocalTime time={new Date(findings.windowToMs)} timeZone={timeZone} now={now} />;{' '}
            {findings.samplesUsed} {findings.basis ?? null}
          </p>
          <ul className="findings">
            {findings.items.map((f, i) => (
              <li key={i} data-code={f.code} data-severity={f.severity}>
                <p className="finding-head">
                  <StateIcon state={f.icon} />
                  <strong>{f.heading}</strong> <span>{f.observation}</span>
                </p>
                {f.nextSteps === undefined ? null : (
                  <p className="finding-next" data-testid="next-steps">
                    <strong>Next steps:</strong> {f.nextSteps}
                  </p>
                )}
                {f.caution === undefined ? null : (
                  <p className="caution" data-testid="safety-caution">
                    {f.caution}
                  </p>
                )}
              </li>
            ))}
          </ul>
          {findings.closingCaution === undefined ? null : (
            <p className="caution" data-testid="safety-caution">
              {findings.closingCaution}
            </p>
          )}
        </>
      )}
    </section>
  );
}
