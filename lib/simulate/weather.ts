/**
 * The weather of a demo site as functions of time: air temperature, the
 * slowly drifting mean wind, air pressure and density, water temperature and
 * the water available to a hydro intake. Slow parts are pure functions of
 * time and seed, so a history and the live run that follows it join up.
 */
import { mulberry32, seedFor, smoothNoise } from './random';

/** Sea-level standard pressure, Pa (ISO 2533 standard atmosphere). */
export const SEA_LEVEL_PA = 101_325;
/** Specific gas constant of dry air, J/(kg·K) (ISO 2533: 287.05287). */
export const DRY_AIR_J_PER_KG_K = 287.05287;
/** 0 °C in kelvin. */
export const KELVIN_AT_0C = 273.15;

const DAY_MS = 86_400_000;
const YEAR_DAYS = 365.2425;

/**
 * Pressure in Pa of the standard atmosphere at `altitudeM` m (troposphere,
 * ISO 2533): p = 101325·(1 − 2.25577·10⁻⁵·h)^5.25588.
 * @example standardPressurePa(1000) // ≈ 89875
 */
export function standardPressurePa(altitudeM: number): number {
  if (!(altitudeM >= -500 && altitudeM <= 11_000)) throw new RangeError(`altitudeM must be within −500..11000 m, got ${altitudeM}`);
  return SEA_LEVEL_PA * Math.pow(1 - 2.25577e-5 * altitudeM, 5.25588);
}

/**
 * Density of dry air in kg/m³ at `pressurePa` Pa and `airC` °C (ideal gas, ρ = p/(R·T)).
 * @example airDensityKgM3(101325, 15) // ≈ 1.225
 */
export function airDensityKgM3(pressurePa: number, airC: number): number {
  if (!(pressurePa > 0)) throw new RangeError(`pressurePa must be above 0 Pa, got ${pressurePa}`);
  if (!(airC > -KELVIN_AT_0C)) throw new RangeError(`airC must be above absolute zero, got ${airC}`);
  return pressurePa / (DRY_AIR_J_PER_KG_K * (airC + KELVIN_AT_0C));
}

/**
 * Day of the year in UTC, fractional, 0 at 1 January 00:00.
 * @example dayOfYear(Date.UTC(2026, 1, 1, 12)) // 31.5
 */
export function dayOfYear(tMs: number): number {
  const start = Date.UTC(new Date(tMs).getUTCFullYear(), 0, 1);
  return (tMs - start) / DAY_MS;
}

const offsetCache = new Map<string, Map<number, number>>();

/**
 * Offset of `timeZone` from UTC in minutes at `tMs` (cached per hour, since
 * zones only change offset on the hour).
 * @example zoneOffsetMinutes(Date.UTC(2026, 6, 1), 'Europe/London') // 60
 */
export function zoneOffsetMinutes(tMs: number, timeZone: string): number {
  const hour = Math.floor(tMs / 3_600_000);
  let zone = offsetCache.get(timeZone);
  if (zone === undefined) {
    zone = new Map();
    offsetCache.set(timeZone, zone);
  }
  const cached = zone.get(hour);
  if (cached !== undefined) return cached;
  const name = new Intl.DateTimeFormat('en-US', { timeZone, timeZoneName: 'longOffset' })
    .formatToParts(new Date(hour * 3_600_000))
    .find((p) => p.type === 'timeZoneName')?.value;
  const m = /GMT(?:([+-])(\d{1,2})(?::(\d{2}))?)?/.exec(name ?? '');
  if (m === null) throw new RangeError(`timeZone ${timeZone} gave no UTC offset`);
  const minutes = m[1] === undefined ? 0 : (m[1] === '-' ? -1 : 1) * (Number(m[2]) * 60 + Number(m[3] ?? 0));
  if (zone.size > 10_000) zone.clear();
  zone.set(hour, minutes);
  return minutes;
}

/** Local hour of the day 0..24 in `timeZone` at `tMs`. */
export function localHour(tMs: number, timeZone: string): number {
  const local = tMs + zoneOffsetMinutes(tMs, timeZone) * 60_000;
  return (((local % DAY_MS) + DAY_MS) % DAY_MS) / 3_600_000;
}

/** Climate of a site: what its weather swings around. */
export interface SiteClimate {
  /** Height above sea level, m (sets air pressure). */
  readonly altitudeM: number;
  /** Yearly mean air temperature, °C. */
  readonly airMeanC: number;
  /** Half the summer–winter swing of the daily mean, K. */
  readonly airSeasonalC: number;
  /** Half the day–night swing, K. */
  readonly airDiurnalC: number;
  /** Yearly mean wind speed at hub height, m/s (wind sites). */
  readonly windMeanMs?: number;
  /** Turbulence intensity: standard deviation over mean of the wind, 0..1. */
  readonly turbulenceIntensity?: number;
  /** Mean water temperature, °C (hydro sites). */
  readonly waterMeanC?: number;
  /** Half the seasonal swing of the water temperature, K. */
  readonly waterSeasonalC?: number;
  /** Mean water available at the intake over the design flow (1 = design flow on average). */
  readonly flowMeanFraction?: number;
  /** Relative seasonal swing of the available water, 0..1 (snow melt, dry season). */
  readonly flowSeasonalFraction?: number;
  /** Day of the year of the highest flows (0 = 1 January). */
  readonly flowPeakDay?: number;
}

/** Climate used for a site the scenario does not describe. */
export const DEFAULT_CLIMATE: SiteClimate = {
  altitudeM: 200,
  airMeanC: 10,
  airSeasonalC: 7,
  airDiurnalC: 4,
  windMeanMs: 6.5,
  turbulenceIntensity: 0.12,
  waterMeanC: 8,
  waterSeasonalC: 4,
  flowMeanFraction: 0.8,
  flowSeasonalFraction: 0.3,
  flowPeakDay: 130,
};

/** What a unit model asks of its site's weather. */
export interface WeatherSource {
  readonly timeZone: string;
  readonly climate: SiteClimate;
  /** Air temperature, °C. */
  airC(tMs: number): number;
  /** Air density, kg/m³. */
  airDensityKgM3(tMs: number): number;
  /** Mean wind at hub height, m/s, before turbulence. */
  windMeanMs(tMs: number): number;
  /** Water temperature, °C. */
  waterC(tMs: number): number;
  /** Water available at the intake over the design flow. */
  availableFlowFraction(tMs: number): number;
}

/** Weather of one site, a pure function of time for a given seed. */
export class SiteWeather implements WeatherSource {
  private readonly airNoise: (tMs: number) => number;
  private readonly windNoise: (tMs: number) => number;
  private readonly pressureNoise: (tMs: number) => number;
  private readonly flowNoise: (tMs: number) => number;
  private readonly waterNoise: (tMs: number) => number;
  private readonly basePa: number;

  constructor(
    readonly siteId: string,
    readonly timeZone: string,
    readonly climate: SiteClimate,
    seed: number,
  ) {
    const u = (what: string) => mulberry32(seedFor(seed, `${siteId}/${what}`));
    this.airNoise = smoothNoise(u('air'), 2 * 3600, 6 * 86_400);
    // Weather systems pass in hours to days; the wind follows them.
    this.windNoise = smoothNoise(u('wind'), 1.5 * 3600, 5 * 86_400);
    this.pressureNoise = smoothNoise(u('pressure'), 12 * 3600, 8 * 86_400);
    this.flowNoise = smoothNoise(u('flow'), 6 * 3600, 20 * 86_400);
    this.waterNoise = smoothNoise(u('water'), 12 * 3600, 10 * 86_400);
    this.basePa = standardPressurePa(climate.altitudeM);
  }

  /** Air temperature, °C: yearly mean, coldest about 20 January, warmest mid-afternoon local time. */
  airC(tMs: number): number {
    const c = this.climate;
    const season = -Math.cos((2 * Math.PI * (dayOfYear(tMs) - 20)) / YEAR_DAYS);
    const day = Math.cos((2 * Math.PI * (localHour(tMs, this.timeZone) - 15)) / 24);
    return c.airMeanC + c.airSeasonalC * season + c.airDiurnalC * day + 2 * this.airNoise(tMs);
  }

  /** Air pressure, Pa: the standard atmosphere at the site's height, ±1 % with the weather. */
  pressurePa(tMs: number): number {
    return this.basePa * (1 + 0.01 * this.pressureNoise(tMs));
  }

  /** Air density, kg/m³, from pressure and temperature. */
  airDensityKgM3(tMs: number): number {
    return airDensityKgM3(this.pressurePa(tMs), this.airC(tMs));
  }

  /**
   * Ten-minute mean wind at hub height, m/s: windier in winter and in the
   * afternoon, with weather systems as a lognormal swing (a typical
   * coefficient of variation of hourly means about 0.4, common practice).
   */
  windMeanMs(tMs: number): number {
    const c = this.climate;
    const mean = c.windMeanMs ?? DEFAULT_CLIMATE.windMeanMs!;
    const season = 1 + 0.15 * Math.cos((2 * Math.PI * (dayOfYear(tMs) - 15)) / YEAR_DAYS);
    const day = 1 + 0.1 * Math.cos((2 * Math.PI * (localHour(tMs, this.timeZone) - 14)) / 24);
    // exp(σn − σ²/2) keeps the long-run mean at `mean`.
    const sigma = 0.4;
    return mean * season * day * Math.exp(sigma * this.windNoise(tMs) - (sigma * sigma) / 2);
  }

  /** Water temperature, °C: follows the season a month behind the air, with a small daily swing. */
  waterC(tMs: number): number {
    const c = this.climate;
    const mean = c.waterMeanC ?? DEFAULT_CLIMATE.waterMeanC!;
    const swing = c.waterSeasonalC ?? DEFAULT_CLIMATE.waterSeasonalC!;
    const season = -Math.cos((2 * Math.PI * (dayOfYear(tMs) - 50)) / YEAR_DAYS);
    const day = Math.cos((2 * Math.PI * (localHour(tMs, this.timeZone) - 17)) / 24);
    return Math.max(0.5, mean + swing * season + 0.4 * day + 0.5 * this.waterNoise(tMs));
  }

  /**
   * Water available at the intake over the design flow: seasonal (snow melt
   * or rainy season), a small daily swing (melt in the afternoon reaches the
   * intake in the evening) and wet and dry spells.
   */
  availableFlowFraction(tMs: number): number {
    const c = this.climate;
    const mean = c.flowMeanFraction ?? DEFAULT_CLIMATE.flowMeanFraction!;
    const swing = c.flowSeasonalFraction ?? DEFAULT_CLIMATE.flowSeasonalFraction!;
    const peak = c.flowPeakDay ?? DEFAULT_CLIMATE.flowPeakDay!;
    const season = 1 + swing * Math.cos((2 * Math.PI * (dayOfYear(tMs) - peak)) / YEAR_DAYS);
    const day = 1 + 0.04 * Math.cos((2 * Math.PI * (localHour(tMs, this.timeZone) - 20)) / 24);
    return Math.max(0, mean * season * day * Math.exp(0.18 * this.flowNoise(tMs) - 0.0162));
  }
}
