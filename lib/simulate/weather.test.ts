import { describe, expect, it } from 'vitest';
import { SiteWeather, airDensityKgM3, dayOfYear, localHour, standardPressurePa, zoneOffsetMinutes } from './weather';
import { demoClimates } from './demo-fleet';

describe('standard atmosphere', () => {
  it('matches the ISO 2533 table: 101 325 Pa at 0 m, 89 875 Pa at 1000 m, 79 495 Pa at 2000 m', () => {
    expect(standardPressurePa(0)).toBeCloseTo(101_325, 6);
    expect(standardPressurePa(1000)).toBeCloseTo(89_875, -1);
    expect(standardPressurePa(2000)).toBeCloseTo(79_495, -1);
  });

  it('gives 1.225 kg/m³ at 101 325 Pa and 15 °C (ISO 2533 sea-level density)', () => {
    expect(airDensityKgM3(101_325, 15)).toBeCloseTo(1.225, 3);
  });

  it('gives 1.2922 kg/m³ at 101 325 Pa and 0 °C (dry air at STP, handbook value, from memory)', () => {
    expect(airDensityKgM3(101_325, 0)).toBeCloseTo(1.2922, 3);
  });

  it('names bad inputs', () => {
    expect(() => standardPressurePa(20_000)).toThrow(/altitudeM.*20000/);
    expect(() => airDensityKgM3(0, 10)).toThrow(/pressurePa.*0/);
  });
});

describe('time of day and year', () => {
  it('knows the zone offsets the IANA database gives', () => {
    expect(zoneOffsetMinutes(Date.UTC(2026, 0, 15), 'Europe/London')).toBe(0);
    expect(zoneOffsetMinutes(Date.UTC(2026, 6, 15), 'Europe/London')).toBe(60);
    expect(zoneOffsetMinutes(Date.UTC(2026, 0, 15), 'America/Denver')).toBe(-420);
    expect(zoneOffsetMinutes(Date.UTC(2026, 6, 15), 'America/Halifax')).toBe(-180);
  });

  it('puts noon UTC at 13:00 in Vienna in winter', () => {
    expect(localHour(Date.UTC(2026, 0, 15, 12), 'Europe/Vienna')).toBeCloseTo(13, 9);
  });

  it('counts days from 1 January', () => {
    expect(dayOfYear(Date.UTC(2026, 1, 1, 12))).toBeCloseTo(31.5, 9);
  });
});

describe('SiteWeather', () => {
  const w = new SiteWeather('quorvenna-ildresk', 'Europe/London', demoClimates['quorvenna-ildresk']!, 1);
  const january = Date.UTC(2026, 0, 10);
  const july = Date.UTC(2026, 6, 10);

  it('is the same for the same seed and time', () => {
    const again = new SiteWeather('quorvenna-ildresk', 'Europe/London', demoClimates['quorvenna-ildresk']!, 1);
    expect(again.windMeanMs(july)).toBe(w.windMeanMs(july));
    expect(again.airC(july)).toBe(w.airC(july));
  });

  it('is warmer in summer than in winter on average', () => {
    const avg = (t0: number, f: (t: number) => number) => {
      let s = 0;
      for (let i = 0; i < 14 * 24; i++) s += f(t0 + i * 3_600_000);
      return s / (14 * 24);
    };
    expect(avg(july, (t) => w.airC(t))).toBeGreaterThan(avg(january, (t) => w.airC(t)) + 5);
  });

  it('keeps the long-run mean wind near the climate mean', () => {
    let s = 0;
    const n = 365 * 24;
    for (let i = 0; i < n; i++) s += w.windMeanMs(Date.UTC(2026, 0, 1) + i * 3_600_000);
    expect(s / n).toBeGreaterThan(6.6 * 0.85);
    expect(s / n).toBeLessThan(6.6 * 1.15);
  });

  it('thins the air with height: density at 1950 m well below sea-level density', () => {
    const high = new SiteWeather('vuskamel-orrotheen', 'America/Denver', demoClimates['vuskamel-orrotheen']!, 1);
    expect(high.airDensityKgM3(july)).toBeLessThan(1.05);
    expect(high.airDensityKgM3(july)).toBeGreaterThan(0.85);
  });
});
