import { describe, expect, it } from 'vitest';
import { formatEnergyKwh, formatNumber, formatPowerKw, formatSiteTime, formatUtc, MISSING } from './format';

describe('screen formatting', () => {
  it('shows a number with its unit, and an en dash when missing', () => {
    expect(formatNumber(1234.56, 1, 'kW')).toBe('1,234.6\u202fkW');
    expect(formatNumber(null, 1, 'kW')).toBe(MISSING);
    expect(formatNumber(Number.NaN)).toBe(MISSING);
    expect(formatPowerKw(1520)).toBe('1.52\u202fMW');
    expect(formatPowerKw(3.456)).toBe('3.46\u202fkW');
    expect(formatEnergyKwh(12_345)).toBe('12.3\u202fMWh');
    expect(formatEnergyKwh(42.25)).toBe('42.3\u202fkWh');
  });

  it('shows a time in the site’s zone as a time of day, with the date only when not today', () => {
    const now = new Date('2026-12-02T18:00:00Z');
    // London is on UTC in December; Halifax is UTC−4 (Atlantic Standard Time).
    expect(formatSiteTime(new Date('2026-12-02T14:05:00Z'), 'Europe/London', now)).toBe('14:05');
    expect(formatSiteTime(new Date('2026-12-02T14:05:00Z'), 'America/Halifax', now)).toBe('10:05');
    expect(formatSiteTime(new Date('2026-12-01T14:05:00Z'), 'Europe/London', now)).toBe('1 Dec 14:05');
    expect(formatSiteTime(new Date('2025-12-01T14:05:00Z'), 'Europe/London', now)).toBe('1 Dec 2025 14:05');
    // Just after midnight in Vienna (UTC+1) is already the next day there.
    expect(formatSiteTime(new Date('2026-12-02T23:30:00Z'), 'Europe/Vienna', new Date('2026-12-03T00:10:00Z'))).toBe('00:30');
    expect(formatUtc(new Date('2026-12-02T14:05:09.123Z'))).toBe('2026-12-02 14:05:09 UTC');
  });
});
