import type { Metadata } from 'next';
import { loadFleetScreen } from '@/lib/fleet/screen';
import { SAFETY_CAUTION } from '@/lib/diagnosis/findings';
import { StateCounts } from '@/app/_components/state-badge';
import { SiteCard } from '@/app/_components/site-card';

export const dynamic = 'force-dynamic';
export const metadata: Metadata = { title: 'Fleet' };


export default async function FleetPage() {
  const fleet = await loadFleetScreen();
  const now = new Date(fleet.nowMs);
  const { totals, unitCount, attention } = fleet;
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
            <SiteCard key={site.id} site={site} now={now} alerts={fleet.alerts[site.id]} />
          ))}
        </div>
      )}

      {fleet.quarantine && fleet.quarantine.total > 0 ? (
        <section className="panel set-aside" data-testid="set-aside" aria-labelledby="set-aside-heading">
          <h2 id="set-aside-heading">
            Telemetry set aside{' '}
            <span className="muted">
              {fleet.quarantine.lastDayText} in the last day, {fleet.quarantine.totalText} in the last {fleet.retentionDays} days
            </span>
          </h2>
          <p className="note">
            Telemetry that could not be stored (invalid, or from a unit not registered), kept with the reason for {fleet.retentionDays} days. Newest
            first; all of it, by unit, on <a href="/data-quality">Data quality</a>.
          </p>
          <ul>
            {fleet.quarantine.recent.map((q, i) => (
              <li key={i}>
                <span className="muted">{q.ago}</span> <code>{q.topic}</code> {q.reason}
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
