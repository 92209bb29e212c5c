import { LiveUpdates } from '@/app/_components/live-updates';
import { LocalTime } from '@/app/_components/local-time';
import { StateBadge } from '@/app/_components/state-badge';
import type { UnitScreen } from '@/lib/units/screen';

/** The unit's name, state, kind and last sample, with the live-updates switch. */
export function UnitHead({ site, unit, head, timeZone, nowMs }: Pick<UnitScreen, 'site' | 'unit' | 'head' | 'timeZone' | 'nowMs'>) {
  const { lastSample } = head;
  return (
    <div className="page-head">
      <div>
        <h1>
          <span className="unit-id">{unit.id}</span>
          {unit.name ? <span className="muted"> {unit.name}</span> : null}
        </h1>
        <p>
          <StateBadge state={head.state} label={head.stateLabel} />{' '}
          <span className="note">
            {head.summary}{' '}
            {lastSample.atMs === null ? (
              lastSample.ago
            ) : (
              <>
                <LocalTime time={new Date(lastSample.atMs)} timeZone={timeZone} now={new Date(nowMs)} /> ({lastSample.ago})
              </>
            )}
          </span>
        </p>
        {head.reason === undefined ? null : <p data-testid="unit-reason">{head.reason}</p>}
      </div>
      <LiveUpdates siteId={site.id} unitId={unit.id} unitNames={{ [unit.id]: unit.name ?? unit.id }} />
    </div>
  );
}
