/**
 * The site screen's choices that left the page: the sort links and the
 * unbalance alarm per row, which uses the diagnosis's own rule and limits.
 */
import { describe, expect, it } from 'vitest';
import { DEFAULT_LIMITS, resolveLimits, unbalanceIsAlarm } from '@/lib/diagnosis/limits';
import { setAsideCount, siteAlertsView, sortHref } from './screen';
import { QUARANTINE_COUNT_CAP } from '@/lib/quality/queries';

describe('site screen', () => {
  it('sort links turn the order round on the current column and keep the state filter', () => {
    expect(sortHref({ state: 'all', sort: 'state', dir: 'asc' }, 'state')).toBe('?sort=state&dir=desc');
    expect(sortHref({ state: 'all', sort: 'state', dir: 'desc' }, 'state')).toBe('?sort=state&dir=asc');
    expect(sortHref({ state: 'fault', sort: 'state', dir: 'asc' }, 'power')).toBe('?sort=power&dir=asc&state=fault');
  });

  it('marks unbalance past the alarm line, not at it, with the unit’s own line over the default (contract section 5: "above 2 %")', () => {
    expect(DEFAULT_LIMITS.unbalanceAlarmPct).toBe(2);
    expect(unbalanceIsAlarm(2, DEFAULT_LIMITS)).toBe(false);
    expect(unbalanceIsAlarm(2.01, DEFAULT_LIMITS)).toBe(true);
    expect(unbalanceIsAlarm(null, DEFAULT_LIMITS)).toBe(false);
    expect(unbalanceIsAlarm(undefined, DEFAULT_LIMITS)).toBe(false);
    expect(unbalanceIsAlarm(2.5, resolveLimits({ unbalanceAlarmPct: 3 }))).toBe(false);
    expect(unbalanceIsAlarm(3.1, resolveLimits({ unbalanceAlarmPct: 3 }))).toBe(true);
  });

  it('counts of set-aside telemetry past the cap read "more than"', () => {
    expect(setAsideCount(12)).toBe('12');
    expect(setAsideCount(QUARANTINE_COUNT_CAP)).toBe(QUARANTINE_COUNT_CAP.toLocaleString('en-GB'));
    expect(setAsideCount(QUARANTINE_COUNT_CAP + 1)).toBe(`more than ${QUARANTINE_COUNT_CAP.toLocaleString('en-GB')}`);
  });

  it('a site’s open alerts in words, linking to the list filtered to the site', () => {
    expect(siteAlertsView('north', undefined)).toEqual({ open: 0, alarms: 0, text: 'none', href: '/alerts?site=north' });
    expect(siteAlertsView('north', { open: 3, alarms: 1 }).text).toBe('3 (1 alarm)');
    expect(siteAlertsView('north', { open: 2, alarms: 2 }).text).toBe('2 (2 alarms)');
    expect(siteAlertsView('north', { open: 4, alarms: 0 }).text).toBe('4');
  });
});
