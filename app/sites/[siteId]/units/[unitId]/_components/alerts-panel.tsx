import { LocalTime } from '@/app/_components/local-time';
import { StateBadge } from '@/app/_components/state-badge';
import type { UnitScreenWithAlerts } from '@/lib/units/screen';

/** The unit's open alerts (and cleared ones nobody took), each linking to its own page with its history and actions. */
export function AlertsPanel({ alerts, timeZone, nowMs }: { alerts: UnitScreenWithAlerts['alerts']; timeZone: string; nowMs: number }) {
  const now = new Date(nowMs);
  return (
    <section className="panel" aria-labelledby="unit-alerts-heading" data-testid="unit-alerts">
      <h2 id="unit-alerts-heading">Alerts</h2>
      {alerts.rows.length === 0 ? (
        <p className="note">No open alert on this unit.</p>
      ) : (
        <ul className="attention">
          {alerts.rows.map((a) => (
            <li key={a.id} data-alert={a.id} data-state={a.state}>
              <StateBadge state={a.badge} label={a.severityName} />
              <a href={a.href}>{a.conditionName}</a>
              <span className="why">
                {a.stateText}, since <LocalTime time={a.openedAt} timeZone={timeZone} now={now} />
              </span>
            </li>
          ))}
        </ul>
      )}
      <p className="note">
        <a href={alerts.allHref}>Every alert of this unit, with the cleared ones</a>
      </p>
    </section>
  );
}
