import { useId } from 'react';
import { formatSiteTime, formatUtc } from '@/lib/text/format';

/**
 * A time in the site's own zone, shown as a time ("14:05", "2 Dec 14:05"),
 * never as a zone name. UTC is in the title (hover); the time takes focus, and
 * on focus UTC is shown beside it and is its accessible description (the
 * description element is not displayed otherwise, so it is not read twice).
 */
export function LocalTime({ time, timeZone, now = new Date() }: { time: Date | null; timeZone: string; now?: Date }) {
  const id = useId();
  if (time === null) return <span className="muted">never</span>;
  const utc = formatUtc(time);
  return (
    <span className="local-time-wrap">
      <time className="local-time" dateTime={time.toISOString()} title={utc} tabIndex={0} aria-describedby={id}>
        {formatSiteTime(time, timeZone, now)}
      </time>
      <span id={id} className="local-time-utc">
        {utc}
      </span>
    </span>
  );
}
