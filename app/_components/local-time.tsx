import { useId } from 'react';
import { formatSiteTime, formatUtc } from './format';

/**
 * A time in the site's own zone, shown as a time ("14:05", "2 Dec 14:05"),
 * never as a zone name. UTC is in the title (hover) and, because the element
 * takes focus, shown beside it on focus and given to screen readers as its
 * description.
 */
export function LocalTime({ time, timeZone, now = new Date() }: { time: Date | null; timeZone: string; now?: Date }) {
  const id = useId();
  if (time === null) return <span className="muted">never</span>;
  const utc = formatUtc(time);
  return (
    <time className="local-time" dateTime={time.toISOString()} title={utc} tabIndex={0} aria-describedby={id}>
      {formatSiteTime(time, timeZone, now)}
      <span id={id} className="local-time-utc">
        {utc}
      </span>
    </time>
  );
}
