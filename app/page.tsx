import { QUARANTINE_COUNT_CAP } from '../lib/fleet/queries';
import { loadFleetOverview } from '../lib/fleet/overview';
import { StateBadge } from './_components/state-badge';
import { unitStateOf } from '../lib/fleet/unit-state';
import { ago } from './_components/format';

export const dynamic = 'force-dynamic';

/** A count of set-aside rows; the query stops counting past the cap. */
function setAsideCount(n: number): string {
  return n > QUARANTINE_COUNT_CAP ? `more than ${QUARANTINE_COUNT_CAP.toLocaleString('en-GB')}` : n.toLocaleString('en-GB');
}

export default async function FleetPage() {
  const fleet = await loadFleetOverview();
  const now = new Date();
  const { retentionDays } = fleet;
  return (
    <>
      <section className="summary" aria-label="fleet summary">
        <h1>Fleet</h1>
        <p>
          <strong>{fleet.unitCount}</strong> unit{fleet.unitCount === 1 ? '' : 's'} on <strong>{fleet.sites.length}</strong> site
          {fleet.sites.length === 1 ? '' : 's'} · <strong>{fleet.onlineCount}</strong> reporting ·{' '}
          <strong>{fleet.attentionCount}</strong> needing attention
        </p>
        {fleet.demo && fleet.demo.status !== 'off' ? (
          <p className="note">Demo fleet (invented sites and units): {fleet.demo.phase ?? fleet.demo.status}.</p>
        ) : null}
      </section>

      {fleet.sites.length === 0 ? (
        <section className="empty" data-testid="empty-fleet">
          <h2>No units registered yet</h2>
          <p>
            Register sites and units with <code>npx millrace units import FLEET.json</code> (see README), then point each
            unit&apos;s controller at the MQTT topic <code>millrace/&lt;site&gt;/&lt;unit&gt;/telemetry</code>.
          </p>
          <p>To see millrace with an invented demo fleet instead, start it with <code>DEMO=on</code> (the default on embedded settings).</p>
        </section>
      ) : (
        fleet.sites.map((site) => (
          <section key={site.id} className="site" data-testid={`site-${site.id}`}>
            <h2>
              {site.name} <span className="muted">{site.timezone}</span>
            </h2>
            <table>
              <thead>
                <tr>
                  <th scope="col">Unit</th>
                  <th scope="col">Kind</th>
                  <th scope="col" className="num">Rated kW</th>
                  <th scope="col">Link</th>
                  <th scope="col">Last sample</th>
                  <th scope="col">Diagnosis</th>
                  <th scope="col" className="num" title="measured Ke, corrected for load and magnet temperature, over nameplate Ke">
                    Ke ratio
                  </th>
                </tr>
              </thead>
              <tbody>
                {site.units.map((unit) => (
                  <tr key={unit.id} data-unit={unit.id}>
                    <td>
                      <span className="unit-id">{unit.id}</span>
                      {unit.name ? <span className="muted"> {unit.name}</span> : null}
                    </td>
                    <td>{unit.kind}</td>
                    <td className="num">{unit.ratedKw.toFixed(1)}</td>
                    <td>
                      <span className={`link link-${unit.presence ?? 'unknown'}`}>{unit.presence ?? 'unknown'}</span>
                    </td>
                    <td>{ago(unit.lastSampleTs, now)}</td>
                    <td>
                      <StateBadge
                        {...unitStateOf({
                          health: unit.verdict === null ? undefined : { verdict: unit.verdict, findings: [] },
                          lastSampleMs: unit.lastSampleTs?.getTime() ?? null,
                          nowMs: now.getTime(),
                        })}
                      />
                    </td>
                    <td className="num">{unit.keRatio === null ? '–' : unit.keRatio.toFixed(3)}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </section>
        ))
      )}
      {fleet.quarantine.total > 0 ? (
        <section className="set-aside" data-testid="set-aside">
          <h2>
            Telemetry set aside{' '}
            <span className="muted">
              {setAsideCount(fleet.quarantine.lastDay)} in the last day, {setAsideCount(fleet.quarantine.total)} in the last {retentionDays} days
            </span>
          </h2>
          <p className="note">
            Telemetry that could not be stored (invalid, or from a unit not registered) is kept here with the reason for {retentionDays} days
            (RETENTION_DAYS). Newest first:
          </p>
          <ul>
            {fleet.quarantine.recent.map((q, i) => (
              <li key={i}>
                <span className="muted">{ago(q.receivedAt, now)}</span> <code>{q.topic}</code> {q.reason}
              </li>
            ))}
          </ul>
        </section>
      ) : null}
      <footer className="caution">
        A permanent-magnet generator makes voltage whenever its shaft turns, even when disconnected. Before anyone works on a
        unit: stop and lock the rotor, isolate and prove dead, following the manufacturer&apos;s procedure, local electrical
        codes and licensed practice.
      </footer>
    </>
  );
}
