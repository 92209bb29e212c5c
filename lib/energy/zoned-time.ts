/**
 * Wall-clock time in an IANA time zone, through the platform's own zone
 * database (Intl). A "wall-clock ms" is the local date and time written as if
 * it were UTC: Date.UTC(year, month - 1, day, hour, minute, second).
 */

/** The zone every calculation uses unless told otherwise. */
export const UTC_ZONE = 'UTC';

const MS_PER_DAY = 86_400_000;

const formatters = new Map<string, Intl.DateTimeFormat>();

function formatterFor(timeZone: string): Intl.DateTimeFormat {
  let formatter = formatters.get(timeZone);
  if (formatter === undefined) {
    try {
      formatter = new Intl.DateTimeFormat('en-US', {
        timeZone,
        hourCycle: 'h23',
        year: 'numeric',
        month: 'numeric',
        day: 'numeric',
        hour: 'numeric',
        minute: 'numeric',
        second: 'numeric',
        era: 'short',
      });
    } catch (cause) {
      throw new RangeError(`timeZone must be an IANA time zone such as Europe/Oslo, got ${JSON.stringify(timeZone)}`, { cause });
    }
    formatters.set(timeZone, formatter);
  }
  return formatter;
}

function isUtc(timeZone: string): boolean {
  return timeZone === 'UTC' || timeZone === 'Etc/UTC';
}

/**
 * Local wall-clock ms of the instant `epochMs` in `timeZone` (whole seconds; ms kept).
 * @example wallClockMs(Date.UTC(2026, 2, 29, 1, 0), 'Europe/Oslo') // Date.UTC(2026, 2, 29, 3, 0): summer time has begun
 */
export function wallClockMs(epochMs: number, timeZone: string): number {
  if (!Number.isFinite(epochMs)) throw new RangeError(`epochMs must be finite, got ${epochMs}`);
  if (isUtc(timeZone)) return epochMs;
  const parts = formatterFor(timeZone).formatToParts(epochMs);
  let year = 0;
  let month = 1;
  let day = 1;
  let hour = 0;
  let minute = 0;
  let second = 0;
  let bc = false;
  for (const part of parts) {
    switch (part.type) {
      case 'year':
        year = Number(part.value);
        break;
      case 'month':
        month = Number(part.value);
        break;
      case 'day':
        day = Number(part.value);
        break;
      case 'hour':
        hour = Number(part.value);
        break;
      case 'minute':
        minute = Number(part.value);
        break;
      case 'second':
        second = Number(part.value);
        break;
      case 'era':
        bc = part.value.startsWith('B');
        break;
      default:
        break;
    }
  }
  const wall = new Date(0);
  wall.setUTCFullYear(bc ? 1 - year : year, month - 1, day);
  wall.setUTCHours(hour, minute, second, 0);
  const ms = ((epochMs % 1000) + 1000) % 1000;
  return wall.getTime() + ms;
}

/**
 * Offset of local time from UTC at the instant `epochMs`, ms (east positive).
 * @example utcOffsetMs(Date.UTC(2026, 6, 1), 'Europe/Oslo') // 7_200_000 (CEST, UTC+2)
 */
export function utcOffsetMs(epochMs: number, timeZone: string): number {
  return wallClockMs(epochMs, timeZone) - epochMs;
}

/**
 * The instant at which the wall clock of `timeZone` reads `wallMs`. A time the
 * clock skips (spring forward) is read with the offset in force before the
 * change, which moves it forward by the jump (a day whose clock starts at
 * 01:00 starts at the instant of the jump); a time the clock shows twice
 * (fall back) gives the earlier instant. These are the "compatible" rules of
 * ECMAScript Temporal.
 * @example epochMsOfWallClock(Date.UTC(2026, 2, 1), 'Europe/Oslo') // Date.UTC(2026, 1, 28, 23, 0)
 */
export function epochMsOfWallClock(wallMs: number, timeZone: string): number {
  if (!Number.isFinite(wallMs)) throw new RangeError(`wallMs must be finite, got ${wallMs}`);
  if (isUtc(timeZone)) return wallMs;
  // Zones change offset at most once in a day around any one time.
  const offsetBefore = utcOffsetMs(wallMs - MS_PER_DAY, timeZone);
  const offsetAfter = utcOffsetMs(wallMs + MS_PER_DAY, timeZone);
  const early = wallMs - Math.max(offsetBefore, offsetAfter);
  const late = wallMs - Math.min(offsetBefore, offsetAfter);
  if (wallClockMs(early, timeZone) === wallMs) return early;
  if (wallClockMs(late, timeZone) === wallMs) return late;
  // Skipped wall time: the clock jumps at the old offset's reading of it.
  return wallMs - offsetBefore;
}
