/**
 * Numbers and times as the screens show them: en-GB grouping, a unit after a
 * thin space, an en dash for a missing value. Pure functions (no React), so
 * that the screens' view models (lib/<area>/screen.ts) choose their texts with them.
 */

/** What a missing reading shows as. */
export const MISSING = '–';

const formats = new Map<number, Intl.NumberFormat>();

/** One formatter per number of decimals: making an Intl.NumberFormat costs far more than using one (a table formats hundreds). */
function numberFormat(digits: number): Intl.NumberFormat {
  let f = formats.get(digits);
  if (f === undefined) {
    f = new Intl.NumberFormat('en-GB', { minimumFractionDigits: digits, maximumFractionDigits: digits });
    formats.set(digits, f);
  }
  return f;
}

/**
 * A number with `digits` decimals and its unit, or an en dash when missing.
 * @example formatNumber(1234.5, 1, 'kW') // '1,234.5 kW'
 */
export function formatNumber(value: number | null | undefined, digits = 0, unit?: string): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return MISSING;
  const text = numberFormat(digits).format(value);
  return unit ? `${text}\u202f${unit}` : text;
}

/**
 * A ratio such as a Ke ratio to three decimals.
 * @example formatRatio(0.9614) // '0.961'
 */
export function formatRatio(value: number | null | undefined): string {
  return formatNumber(value, 3);
}

/**
 * Energy with a unit fit for its size.
 * @example formatEnergyKwh(12_345) // '12.3 MWh'
 */
export function formatEnergyKwh(kwh: number | null | undefined): string {
  if (kwh === null || kwh === undefined || !Number.isFinite(kwh)) return MISSING;
  if (Math.abs(kwh) >= 10_000) return formatNumber(kwh / 1000, 1, 'MWh');
  return formatNumber(kwh, kwh < 100 ? 1 : 0, 'kWh');
}

/**
 * Power with a unit fit for its size.
 * @example formatPowerKw(1520) // '1.52 MW'
 */
export function formatPowerKw(kw: number | null | undefined): string {
  if (kw === null || kw === undefined || !Number.isFinite(kw)) return MISSING;
  if (Math.abs(kw) >= 1000) return formatNumber(kw / 1000, 2, 'MW');
  return formatNumber(kw, Math.abs(kw) < 10 ? 2 : 1, 'kW');
}

/** "12 s ago", "5 min ago", "3 h ago", "2 d ago" from a time and now. */
export function ago(time: Date | null, now: Date): string {
  if (time === null) return 'never';
  const s = Math.max(0, Math.round((now.getTime() - time.getTime()) / 1000));
  if (s < 90) return `${s} s ago`;
  if (s < 90 * 60) return `${Math.round(s / 60)} min ago`;
  if (s < 36 * 3600) return `${Math.round(s / 3600)} h ago`;
  return `${Math.round(s / 86400)} d ago`;
}

const DAY_KEY = new Map<string, Intl.DateTimeFormat>();
function dayKeyFormat(timeZone: string): Intl.DateTimeFormat {
  let f = DAY_KEY.get(timeZone);
  if (!f) {
    f = new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit' });
    DAY_KEY.set(timeZone, f);
  }
  return f;
}

/**
 * A time in the site's zone as a time of day: "14:05" today, "2 Dec 14:05"
 * another day this year, "2 Dec 2025 14:05" another year.
 * @example formatSiteTime(new Date('2026-12-02T14:05:00Z'), 'Europe/London', new Date('2026-12-02T18:00:00Z')) // '14:05'
 */
export function formatSiteTime(time: Date, timeZone: string, now: Date): string {
  const dayOf = (d: Date) => dayKeyFormat(timeZone).format(d);
  const hm = new Intl.DateTimeFormat('en-GB', { timeZone, hour: '2-digit', minute: '2-digit', hourCycle: 'h23' }).format(time);
  if (dayOf(time) === dayOf(now)) return hm;
  const sameYear = dayOf(time).slice(0, 4) === dayOf(now).slice(0, 4);
  const date = new Intl.DateTimeFormat('en-GB', { timeZone, day: 'numeric', month: 'short', ...(sameYear ? {} : { year: 'numeric' }) }).format(time);
  return `${date} ${hm}`;
}

/**
 * The same instant in UTC, for the title and the focus text.
 * @example formatUtc(new Date('2026-12-02T14:05:09Z')) // '2026-12-02 14:05:09 UTC'
 */
export function formatUtc(time: Date): string {
  return `${time.toISOString().slice(0, 19).replace('T', ' ')} UTC`;
}
