/**
 * One site at a glance: units in each state, power now, energy today and the
 * units that need attention, worst first. The fleet page's card links to the
 * site and its units; a wall display's card (`linked={false}`) has no links
 * and leaves out what a glance from across the room does not need.
 */
import type { FleetSite } from '@/lib/fleet/queries';
import type { SiteAlertsView } from '@/lib/fleet/screen';
import { ago, formatEnergyKwh, formatPowerKw } from '@/lib/text/format';
import { LocalTime } from '@/app/_components/local-time';
import { StateBadge, StateCounts } from '@/app/_components/state-badge';

function panelClass(worst: FleetSite['worst']): string {
  return worst === 'fault' ? 'panel-fault' : worst === 'warning' ? 'panel-warning' : '';
}

function OldestSample({ site, now }: { site: FleetSite; now: Date }) {
  if (site.neverSent) return <>a unit never sent one</>;
  if (site.oldestLastSampleMs === null) return <>–</>;
  return (
    <>
      <LocalTime time={new Date(site.oldestLastSampleMs)} timeZone={site.timezone} now={now} />{' '}
      <span className="muted">({ago(new Date(site.oldestLastSampleMs), now)})</span>
    </>
  );
}

function Attention({ site }: { site: FleetSite }) {
  if (site.attention.length === 0) return <p className="note">Every unit healthy and reporting.</p>;
  return (
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
  );
}

function Figures({ site, children }: { site: FleetSite; children?: React.ReactNode }) {
  return (
    <dl className="figures">
      <div>
        <dt>Power now</dt>
        <dd>{formatPowerKw(site.powerKw)}</dd>
      </div>
      <div>
        <dt>Energy today</dt>
        <dd>{formatEnergyKwh(site.energyTodayKwh)}</dd>
      </div>
      {children}
    </dl>
  );
}

/** The wall display's card: no links, nothing a glance from across the room does not need. */
function DisplayCard({ site }: { site: FleetSite }) {
  const panel = panelClass(site.worst);
  return (
    <section className={`site${panel ? ` ${panel}` : ''}`} aria-labelledby={`site-${site.id}`}>
      <h2 id={`site-${site.id}`}>{site.name}</h2>
      <StateCounts counts={site.counts} label={`Units in each state, ${site.name}`} />
      <Figures site={site} />
      {site.attention.length ? (
        <ul className="attention">
          {site.attention.map((a) => (
            <li key={a.id}>
              <StateBadge state={a.state} label={a.label} /> <span className="unit-id">{a.name ?? a.id}</span> <span className="why">{a.reason}</span>
            </li>
          ))}
        </ul>
      ) : null}
    </section>
  );
}

export function SiteCard({ site, now, linked = true, alerts }: { site: FleetSite; now: Date; linked?: boolean; alerts?: SiteAlertsView }) {
  if (!linked) return <DisplayCard site={site} />;
  return (
    <section
      className={`site panel ${panelClass(site.worst)}`}
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
      <Figures site={site}>
        <div>
          <dt>Oldest last sample</dt>
          <dd>
            <OldestSample site={site} now={now} />
          </dd>
        </div>
        {alerts ? (
          <div>
            <dt>Open alerts</dt>
            <dd data-testid="site-alerts">{alerts.open === 0 ? alerts.text : <a href={alerts.href}>{alerts.text}</a>}</dd>
          </div>
        ) : null}
      </Figures>
      <Attention site={site} />
    </section>
  );
}
