/**
 * Bucket edges for integration: calendar months and days in an IANA time zone
 * (local midnight, so a month's length is its real elapsed time across a
 * daylight-saving change), and fixed-width buckets such as 10-minute rollups.
 */
import { UTC_ZONE, epochMsOfWallClock, wallClockMs } from './zoned-time';

/** Consecutive buckets: bucket k is [edgesMs[k], edgesMs[k+1]), labelled labels[k]. */
export interface Buckets {
  /** Edges, epoch ms, strictly rising; one more than there are buckets. */
  readonly edgesMs: number[];
  /** One label a bucket: "2026-03" for a month, "2026-03-29" for a day, ISO time of the start otherwise. */
  readonly labels: string[];
}

function checkRange(fromMs: number, toMs: number): void {
  if (!Number.isFinite(fromMs)) throw new RangeError(`fromMs must be a finite epoch ms, got ${fromMs}`);
  if (!Number.isFinite(toMs)) throw new RangeError(`toMs must be a finite epoch ms, got ${toMs}`);
  if (toMs < fromMs) throw new RangeError(`toMs must not be before fromMs, got ${toMs} < ${fromMs}`);
}

const pad2 = (n: number) => String(n).padStart(2, '0');

function yearLabel(year: number): string {
  return year >= 0 && year <= 9999 ? String(year).padStart(4, '0') : String(year);
}

/**
 * Start of a calendar month in `timeZone`: local midnight on the 1st, epoch ms.
 * `month` is 1..12; other values roll over into neighbouring years.
 * @example monthStartMs(2026, 4, 'Europe/Oslo') // Date.UTC(2026, 2, 31, 22, 0)
 */
export function monthStartMs(year: number, month: number, timeZone: string = UTC_ZONE): number {
  if (!Number.isInteger(year) || !Number.isInteger(month)) {
    throw new RangeError(`year and month must be integers, got ${year} and ${month}`);
  }
  // setUTCFullYear, unlike Date.UTC, takes years 0..99 as they are.
  return epochMsOfWallClock(new Date(0).setUTCFullYear(year, month - 1, 1), timeZone);
}

/** Start of the month numbered `index` = year·12 + (month − 1). */
function monthIndexStartMs(index: number, timeZone: string): number {
  const year = Math.floor(index / 12);
  return monthStartMs(year, index - year * 12 + 1, timeZone);
}

/**
 * Length of a calendar month in `timeZone`, hours.
 * @example monthHours(2026, 3, 'Europe/Oslo') // 743 (summer time begins on 29 March)
 */
export function monthHours(year: number, month: number, timeZone: string = UTC_ZONE): number {
  return (monthStartMs(year, month + 1, timeZone) - monthStartMs(year, month, timeZone)) / 3_600_000;
}

/**
 * The calendar months of `timeZone` that hold any instant of [fromMs, toMs].
 * @example monthBuckets(Date.UTC(2026, 0, 15), Date.UTC(2026, 1, 2)).labels // ['2026-01', '2026-02']
 */
export function monthBuckets(fromMs: number, toMs: number, timeZone: string = UTC_ZONE): Buckets {
  checkRange(fromMs, toMs);
  const wall = new Date(wallClockMs(fromMs, timeZone));
  let index = wall.getUTCFullYear() * 12 + wall.getUTCMonth();
  // In an hour the clock shows twice, the local date can still read the month before.
  while (monthIndexStartMs(index + 1, timeZone) <= fromMs) index++;
  while (monthIndexStartMs(index, timeZone) > fromMs) index--;
  let year = Math.floor(index / 12);
  let month = index - year * 12 + 1;
  const edgesMs = [monthStartMs(year, month, timeZone)];
  const labels: string[] = [];
  while ((edgesMs[edgesMs.length - 1] as number) <= toMs) {
    labels.push(`${yearLabel(year)}-${pad2(month)}`);
    month += 1;
    if (month === 13) {
      month = 1;
      year += 1;
    }
    edgesMs.push(monthStartMs(year, month, timeZone));
  }
  return { edgesMs, labels };
}

/**
 * The calendar days of `timeZone` (local midnight to local midnight) that hold any instant of [fromMs, toMs].
 * @example dayBuckets(Date.UTC(2026, 2, 28, 12), Date.UTC(2026, 2, 29, 12), 'Europe/Oslo').edgesMs.length // 3 (two days, the second 23 h long)
 */
export function dayBuckets(fromMs: number, toMs: number, timeZone: string = UTC_ZONE): Buckets {
  checkRange(fromMs, toMs);
  const wall = new Date(wallClockMs(fromMs, timeZone));
  let dayWall = new Date(0).setUTCFullYear(wall.getUTCFullYear(), wall.getUTCMonth(), wall.getUTCDate());
  // In an hour the clock shows twice, the local date can still read the day before.
  while (epochMsOfWallClock(dayWall + 86_400_000, timeZone) <= fromMs) dayWall += 86_400_000;
  while (epochMsOfWallClock(dayWall, timeZone) > fromMs) dayWall -= 86_400_000;
  const edgesMs = [epochMsOfWallClock(dayWall, timeZone)];
  const labels: string[] = [];
  while ((edgesMs[edgesMs.length - 1] as number) <= toMs) {
    const d = new Date(dayWall);
    labels.push(`${yearLabel(d.getUTCFullYear())}-${pad2(d.getUTCMonth() + 1)}-${pad2(d.getUTCDate())}`);
    dayWall += 86_400_000;
    const edge = epochMsOfWallClock(dayWall, timeZone);
    // A zone that skipped a whole date (Pacific/Apia, 30 December 2011) leaves that day empty: drop it.
    if (edge === edgesMs[edgesMs.length - 1]) {
      labels.pop();
      edgesMs.pop();
    }
    edgesMs.push(edge);
  }
  return { edgesMs, labels };
}

/**
 * Buckets of `widthMs` aligned to multiples of `widthMs` from the epoch, holding any instant of [fromMs, toMs].
 * @example fixedBuckets(Date.UTC(2026, 0, 1, 0, 4), Date.UTC(2026, 0, 1, 0, 12), 600_000).labels // ['2026-01-01T00:00:00.000Z', '2026-01-01T00:10:00.000Z']
 */
export function fixedBuckets(fromMs: number, toMs: number, widthMs: number): Buckets {
  checkRange(fromMs, toMs);
  if (!Number.isInteger(widthMs) || widthMs <= 0) throw new RangeError(`widthMs must be a whole number of ms above 0, got ${widthMs}`);
  const count = Math.floor(toMs / widthMs) - Math.floor(fromMs / widthMs) + 1;
  if (count > 10_000_000) throw new RangeError(`fixedBuckets would make ${count} buckets; widen widthMs or narrow the range`);
  const edgesMs: number[] = [];
  const labels: string[] = [];
  let edge = Math.floor(fromMs / widthMs) * widthMs;
  for (let k = 0; k <= count; k++) {
    edgesMs.push(edge);
    if (k < count) labels.push(new Date(edge).toISOString());
    edge += widthMs;
  }
  return { edgesMs, labels };
}
