import type { Metadata } from 'next';
import { QUARANTINE_COUNT_CAP } from '@/lib/quality/queries';
import { loadFleetScreen } from '@/lib/fleet/overview';
import { UNIT_STATES, sinceText } from '@/lib/fleet/unit-state';
import { SAFETY_CAUTION } from '@/lib/diagnosis/findings';
import { StateBadge, StateCounts } from './_components/state-badge';
import { LocalTime } from './_components/local-time';
import { ago, formatEnergyKwh, formatPowerKw } from './_components/format';

export const dynamic = 'force-dynamic';
export const metadata: Metadata = { title: 'Fleet' };

/** A count of set-aside rows; the query stops counting past the cap. */
function setAsideCount(n: number): string {
  return n > QUARANTINE_COUNT_CAP ? `more than ${QUARANTINE_COUNT_CAP.toLocaleString('en-GB')}` : n.toLocaleString('en-GB');
}

export default async function FleetPage() {
  const fleet = await loadFleetScreen();
  const now = new Date(fleet.nowMs);
  const totals = Object.fromEntries(UNIT_STATES.map((s) => [s, fleet.sites.reduce((n, site) => n + site.counts[s], 0)])) as Record<
    (typeof UNIT_STATES)[number],
    number
  >;
  const unitCount = fleet.sites.reduce((n, s) => n + s.unitCount, 0);
  const attention = unitCount - totals.healthy;
  return (
    <>
      <section className="page-head" aria-labelledby="fleet-heading">
        <div>
          <h1 id="fleet-heading">Fleet</h1>
          <p data-testid="fleet-summary">
            {unitCount} unit{unitCount === 1 ? '' : 's'} on {fleet.sites.length} site{fleet.sites.length === 1 ? '' : 's'}:{' '}
            {attention === 0 ? <strong>all healthy</strong> : <strong>{attention} need attention</strong>}
          </p>
          <StateCounts counts={totals} label="Units in each state, whole fleet" />
        </div>
        {fleet.demo && fleet.demo.status !== 'off' ? (
          <p className="note">Demo fleet (invented sites and units): {fleet.demo.phase ?? fleet.demo.status}.</p>
        ) : null}
      </section>

      {fleet.sites.length === 0 ? (
        <section className="empty" data-testid="empty-fleet">
          <h2>No units registered yet</h2>
          <p>
            Register sites and units on the <a href="/setup">Setup</a> page, or with <code>npx millrace units import FLEET.json</code> (see
            README); then point each unit&apos;s controller at the MQTT topic <code>millrace/&lt;site&gt;/&lt;unit&gt;/telemetry</code>.
          </p>
          <p>To see millrace with an invented demo fleet instead, start it with <code>DEMO=on</code> (the default on embedded settings).</p>
        </section>
      ) : (
        <div className="grid">
          {fleet.sites.map((site) => (
            <section
              key={site.id}
              className={`site panel ${site.worst === 'fault' ? 'panel-fault' : site.worst === 'warning' ? 'panel-warning' : ''}`}
              data-testid={`site-${site.id}`}
              data-site={site.id}
              data-worst={site.worst}
              aria-labelledby={`site-${site.id}-name`}
            >
              <h2 id={`site-${site.id}-name`}>
                <a href={`/sites/${site.id}`}>{site.name}</a>{' '}
                <span className="muted">
                  {site.unitCount} unit{site.unitCount === 1 ? '' : 's'}
                </span>
              </h2>
              <StateCounts counts={site.counts} label={`Units in each state at ${site.name}`} />
              <dl className="figures">
                <div>
                  <dt>Power now</dt>
                  <dd>{formatPowerKw(site.powerKw)}</dd>
                </div>
                <div>
                  <dt>Energy today</dt>
                  <dd>{formatEnergyKwh(site.energyTodayKwh)}</dd>
                </div>
                <div>
                  <dt>Oldest last sample</dt>
                  <dd>
                    {site.neverSent ? (
                      'a unit never sent one'
                    ) : site.oldestLastSampleMs === null ? (
                      '–'
                    ) : (
                      <>
                        <LocalTime time={new Date(site.oldestLastSampleMs)} timeZone={site.timezone} now={now} />{' '}
                        <span className="muted">({ago(new Date(site.oldestLastSampleMs), now)})</span>
                      </>
                    )}
                  </dd>
                </div>
              </dl>
              {site.attention.length === 0 ? (
                <p className="note">Every unit healthy and reporting.</p>
              ) : (
                <>
                  <h3 className="visually-hidden">Units needing attention at {site.name}</h3>
                  <ul className="attention" data-testid="attention">
                    {site.attention.map((a) => (
                      <li key={a.id} data-unit={a.id} data-state={a.state}>
                        <StateBadge state={a.state} label={a.label} />
                        <a href={`/sites/${site.id}/units/${a.id}`}>
                          <span className="unit-id">{a.id}</span>
                          {a.name ? ` ${a.name}` : ''}
                        </a>
                        <span className="why">{a.reason}</span>
                      </li>
                    ))}
                  </ul>
                </>
              )}
            </section>
          ))}
        </div>
      )}

      {fleet.quarantine && fleet.quarantine.total > 0 ? (
        <section className="panel set-aside" data-testid="set-aside" aria-labelledby="set-aside-heading">
          <h2 id="set-aside-heading">
            Telemetry set aside{' '}
            <span className="muted">
              {setAsideCount(fleet.quarantine.lastDay)} in the last day, {setAsideCount(fleet.quarantine.total)} in the last {fleet.retentionDays} days
            </span>
          </h2>
          <p className="note">
            Telemetry that could not be stored (invalid, or from a unit not registered), kept with the reason for {fleet.retentionDays} days. Newest
            first; all of it, by unit, on <a href="/data-quality">Data quality</a>.
          </p>
          <ul>
            {fleet.quarantine.recent.map((q, i) => (
              <li key={i}>
                <span className="muted">{sinceText(fleet.nowMs - q.receivedAt.getTime())} ago</span> <code>{q.topic}</code> {q.reason}
              </li>
            ))}
          </ul>
        </section>
      ) : null}
      <footer className="caution">
        {SAFETY_CAUTION}
      </footer>
    </>
  );
}
