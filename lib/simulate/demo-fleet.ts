/**
 * The demo fleet: an invented scenario of four sites and fourteen units.
 * Every name is made up from invented syllables and matches no place,
 * company, brand or product we know of (DEVELOPERS.md, "Demo fleet", says
 * how that was checked); unit ids are the site's two-letter code and a
 * number. The time zones are real IANA zones. Nameplates are consistent with their
 * ratings: Ke, phase resistance and inductance give the rated line voltage
 * at rated speed and load (resistance about 4–8 % and synchronous reactance
 * 22–35 % of base impedance, as small permanent-magnet machines have); wind
 * power curves stay below a power coefficient of 0.37 at 1.225 kg/m³ for
 * their rotor diameters, and rated speed puts the tip-speed ratio near 7 at
 * rated wind; hydro ratings match ρ·g·Q·H·η at design flow and head.
 *
 * As built (lib/simulate/machine.ts, asBuiltKeFactor): each machine's true
 * Ke is its nameplate's times a factor of 0.99–1.015 drawn from its unit id,
 * so healthy units read a Ke ratio a little off 1, differently each, as real
 * machines do; the nameplates stay as printed.
 *
 * Loads (lib/simulate/machine.ts): every unit feeds a rectifier and
 * inverter (power factor 0.95, free speed) except vo-01, an older set on
 * an electronic load controller (power factor 1, fixed speed; with no speed
 * spread to fit Ke over, it diagnoses as insufficient-data).
 *
 * Faults (lib/simulate/faults.ts), counted in days from the fault epoch,
 * which by default is seven days before the run starts:
 * - qv-02: magnets losing flux, Ke −1 % a day from day 0 (configurable);
 * - sd-02: shorted turn in phase b from day 4.5 (EMF −8 %, line voltages
 *   unbalanced by about 2.7 %, winding 6 K hotter);
 * - pd-02: speed pick-up reading 5 % low from day 5;
 * - pd-03: communications drop 4 minutes into a live run for 20 minutes,
 *   and a 4-hour gap in the history from day 5.5;
 * - qv-04: overspeed in a strong gust every 30 minutes, rotor past maxRpm
 *   for several seconds.
 */
import type { Fleet } from '@/lib/contract/nameplate';
import type { UnitScenario } from './machine';
import type { SiteClimate } from './weather';

/** Days before the start of a run that the demo's fault epoch lies by default. */
export const DEMO_FAULT_LEAD_DAYS = 7;

/** The demo fleet, valid against fleetSchema. */
export const demoFleet: Fleet = {
  sites: [
    { id: 'quorvenna-ildresk', name: 'Quorvenna Ildresk', timezone: 'Europe/London' },
    { id: 'pludvarro-emskeen', name: 'Pludvarro Emskeen', timezone: 'America/Halifax' },
    { id: 'skarvolin-dessequa', name: 'Skarvolin Dessequa', timezone: 'Europe/Vienna' },
    { id: 'vuskamel-orrotheen', name: 'Vuskamel Orrotheen', timezone: 'America/Denver' },
  ],
  units: [
    // Quorvenna Ildresk: an upland wind site, four direct-drive turbines.
    {
      id: 'qv-01', siteId: 'quorvenna-ildresk', name: 'Quorvenna 1', kind: 'wind',
      ratedKw: 10, ratedRpm: 233, maxRpm: 305, poles: 24,
      keVPerKrpm: 2233.3, keRefC: 20, magnet: 'ndfeb', phaseOhm: 0.605, phaseMh: 18.2,
      rotorDiameterM: 6.6, cutInMs: 3, cutOutMs: 25,
      powerCurve: [{ ms: 3, kw: 0 }, { ms: 4, kw: 0.23 }, { ms: 5, kw: 0.67 }, { ms: 6, kw: 1.36 }, { ms: 7, kw: 2.35 }, { ms: 8, kw: 3.69 }, { ms: 9, kw: 5.43 }, { ms: 10, kw: 7.58 }, { ms: 11, kw: 9.47 }, { ms: 12, kw: 9.95 }, { ms: 13, kw: 10 }, { ms: 14, kw: 10 }, { ms: 25, kw: 10 }],
    },
    {
      id: 'qv-02', siteId: 'quorvenna-ildresk', name: 'Quorvenna 2', kind: 'wind',
      ratedKw: 10, ratedRpm: 233, maxRpm: 305, poles: 24,
      keVPerKrpm: 2233.3, keRefC: 20, magnet: 'ndfeb', phaseOhm: 0.605, phaseMh: 18.2,
      rotorDiameterM: 6.6, cutInMs: 3, cutOutMs: 25,
      powerCurve: [{ ms: 3, kw: 0 }, { ms: 4, kw: 0.23 }, { ms: 5, kw: 0.67 }, { ms: 6, kw: 1.36 }, { ms: 7, kw: 2.35 }, { ms: 8, kw: 3.69 }, { ms: 9, kw: 5.43 }, { ms: 10, kw: 7.58 }, { ms: 11, kw: 9.47 }, { ms: 12, kw: 9.95 }, { ms: 13, kw: 10 }, { ms: 14, kw: 10 }, { ms: 25, kw: 10 }],
    },
    {
      id: 'qv-03', siteId: 'quorvenna-ildresk', name: 'Quorvenna 3', kind: 'wind',
      ratedKw: 5, ratedRpm: 327, maxRpm: 425, poles: 16,
      keVPerKrpm: 1660.6, keRefC: 20, magnet: 'ferrite', phaseOhm: 1.45, phaseMh: 33.3,
      rotorDiameterM: 4.7, cutInMs: 3, cutOutMs: 25,
      powerCurve: [{ ms: 3, kw: 0 }, { ms: 4, kw: 0.12 }, { ms: 5, kw: 0.33 }, { ms: 6, kw: 0.67 }, { ms: 7, kw: 1.16 }, { ms: 8, kw: 1.82 }, { ms: 9, kw: 2.69 }, { ms: 10, kw: 3.75 }, { ms: 11, kw: 4.71 }, { ms: 12, kw: 4.97 }, { ms: 13, kw: 5 }, { ms: 14, kw: 5 }, { ms: 25, kw: 5 }],
    },
    {
      id: 'qv-04', siteId: 'quorvenna-ildresk', name: 'Quorvenna 4', kind: 'wind',
      ratedKw: 20, ratedRpm: 195, maxRpm: 255, poles: 20,
      keVPerKrpm: 3179.9, keRefC: 20, magnet: 'ndfeb', phaseOhm: 0.349, phaseMh: 18.8,
      rotorDiameterM: 8.8, cutInMs: 3.5, cutOutMs: 25,
      powerCurve: [{ ms: 3.5, kw: 0 }, { ms: 4, kw: 0.23 }, { ms: 5, kw: 0.97 }, { ms: 6, kw: 2.18 }, { ms: 7, kw: 3.93 }, { ms: 8, kw: 6.32 }, { ms: 9, kw: 9.45 }, { ms: 10, kw: 13.38 }, { ms: 11, kw: 17.66 }, { ms: 12, kw: 19.72 }, { ms: 13, kw: 19.98 }, { ms: 14, kw: 20 }, { ms: 25, kw: 20 }],
    },
    // Pludvarro Emskeen: a coastal ridge, small battery-charging and grid-tied turbines.
    {
      id: 'pd-01', siteId: 'pludvarro-emskeen', name: 'Pludvarro 1', kind: 'wind',
      ratedKw: 3, ratedRpm: 350, maxRpm: 455, poles: 12,
      keVPerKrpm: 918, keRefC: 20, magnet: 'ferrite', phaseOhm: 1.02, phaseMh: 20.7,
      rotorDiameterM: 3.9, cutInMs: 2.5, cutOutMs: 25,
      powerCurve: [{ ms: 2.5, kw: 0 }, { ms: 3, kw: 0.02 }, { ms: 4, kw: 0.11 }, { ms: 5, kw: 0.26 }, { ms: 6, kw: 0.5 }, { ms: 7, kw: 0.83 }, { ms: 8, kw: 1.28 }, { ms: 9, kw: 1.87 }, { ms: 10, kw: 2.55 }, { ms: 11, kw: 2.94 }, { ms: 12, kw: 3 }, { ms: 14, kw: 3 }, { ms: 25, kw: 3 }],
    },
    {
      id: 'pd-02', siteId: 'pludvarro-emskeen', name: 'Pludvarro 2', kind: 'wind',
      ratedKw: 3, ratedRpm: 350, maxRpm: 455, poles: 12,
      keVPerKrpm: 918, keRefC: 20, magnet: 'ferrite', phaseOhm: 1.02, phaseMh: 20.7,
      rotorDiameterM: 3.9, cutInMs: 2.5, cutOutMs: 25,
      powerCurve: [{ ms: 2.5, kw: 0 }, { ms: 3, kw: 0.02 }, { ms: 4, kw: 0.11 }, { ms: 5, kw: 0.26 }, { ms: 6, kw: 0.5 }, { ms: 7, kw: 0.83 }, { ms: 8, kw: 1.28 }, { ms: 9, kw: 1.87 }, { ms: 10, kw: 2.55 }, { ms: 11, kw: 2.94 }, { ms: 12, kw: 3 }, { ms: 14, kw: 3 }, { ms: 25, kw: 3 }],
    },
    {
      id: 'pd-03', siteId: 'pludvarro-emskeen', name: 'Pludvarro 3', kind: 'wind',
      ratedKw: 6, ratedRpm: 301, maxRpm: 390, poles: 16,
      keVPerKrpm: 1696.2, keRefC: 20, magnet: 'ndfeb', phaseOhm: 1.11, phaseMh: 30.1,
      rotorDiameterM: 5.1, cutInMs: 3, cutOutMs: 25,
      powerCurve: [{ ms: 3, kw: 0 }, { ms: 4, kw: 0.14 }, { ms: 5, kw: 0.4 }, { ms: 6, kw: 0.81 }, { ms: 7, kw: 1.4 }, { ms: 8, kw: 2.2 }, { ms: 9, kw: 3.24 }, { ms: 10, kw: 4.53 }, { ms: 11, kw: 5.67 }, { ms: 12, kw: 5.97 }, { ms: 13, kw: 6 }, { ms: 14, kw: 6 }, { ms: 25, kw: 6 }],
    },
    {
      id: 'pd-04', siteId: 'pludvarro-emskeen', name: 'Pludvarro 4', kind: 'wind',
      ratedKw: 1.5, ratedRpm: 471, maxRpm: 610, poles: 8,
      keVPerKrpm: 579.3, keRefC: 20, magnet: 'smco', phaseOhm: 2.13, phaseMh: 37.4,
      rotorDiameterM: 2.9, cutInMs: 2.5, cutOutMs: 25,
      powerCurve: [{ ms: 2.5, kw: 0 }, { ms: 3, kw: 0.01 }, { ms: 4, kw: 0.06 }, { ms: 5, kw: 0.14 }, { ms: 6, kw: 0.26 }, { ms: 7, kw: 0.44 }, { ms: 8, kw: 0.67 }, { ms: 9, kw: 0.98 }, { ms: 10, kw: 1.32 }, { ms: 11, kw: 1.48 }, { ms: 12, kw: 1.5 }, { ms: 14, kw: 1.5 }, { ms: 25, kw: 1.5 }],
    },
    // Skarvolin Dessequa: a mill leat turned run-of-river scheme, three sets.
    {
      id: 'sd-01', siteId: 'skarvolin-dessequa', name: 'Skarvolin 1', kind: 'hydro',
      ratedKw: 15, ratedRpm: 750, maxRpm: 975, poles: 12,
      keVPerKrpm: 669, keRefC: 20, magnet: 'ndfeb', phaseOhm: 0.328, phaseMh: 6.45,
      designHeadM: 42, designFlowM3s: 0.0506, efficiency: 0.72,
    },
    {
      id: 'sd-02', siteId: 'skarvolin-dessequa', name: 'Skarvolin 2', kind: 'hydro',
      ratedKw: 15, ratedRpm: 750, maxRpm: 975, poles: 12,
      keVPerKrpm: 669, keRefC: 20, magnet: 'ndfeb', phaseOhm: 0.328, phaseMh: 6.45,
      designHeadM: 42, designFlowM3s: 0.0506, efficiency: 0.72,
    },
    {
      id: 'sd-03', siteId: 'skarvolin-dessequa', name: 'Skarvolin 3', kind: 'hydro',
      ratedKw: 40, ratedRpm: 500, maxRpm: 650, poles: 16,
      keVPerKrpm: 1718.4, keRefC: 20, magnet: 'ndfeb', phaseOhm: 0.274, phaseMh: 8.1,
      designHeadM: 65, designFlowM3s: 0.0805, efficiency: 0.78,
    },
    // Vuskamel Orrotheen: a high valley with a low-head and a medium-head set, and one turbine on the shoulder.
    {
      id: 'vo-01', siteId: 'vuskamel-orrotheen', name: 'Vuskamel low head', kind: 'hydro',
      ratedKw: 8, ratedRpm: 300, maxRpm: 390, poles: 24,
      keVPerKrpm: 1654.6, keRefC: 20, magnet: 'ferrite', phaseOhm: 0.809, phaseMh: 15.9,
      designHeadM: 12, designFlowM3s: 0.1046, efficiency: 0.65,
    },
    {
      id: 'vo-02', siteId: 'vuskamel-orrotheen', name: 'Vuskamel medium head', kind: 'hydro',
      ratedKw: 25, ratedRpm: 600, maxRpm: 780, poles: 18,
      keVPerKrpm: 1054.3, keRefC: 20, magnet: 'ferrite', magnetTempCoeffPctPerC: -0.19, phaseOhm: 0.248, phaseMh: 4.64,
      designHeadM: 28, designFlowM3s: 0.123, efficiency: 0.74,
    },
    {
      id: 'vo-03', siteId: 'vuskamel-orrotheen', name: 'Vuskamel shoulder', kind: 'wind',
      ratedKw: 12, ratedRpm: 214, maxRpm: 280, poles: 22,
      keVPerKrpm: 2423.1, keRefC: 20, magnet: 'ndfeb', phaseOhm: 0.454, phaseMh: 18,
      rotorDiameterM: 7.2, cutInMs: 3, cutOutMs: 25,
      powerCurve: [{ ms: 3, kw: 0 }, { ms: 4, kw: 0.29 }, { ms: 5, kw: 0.82 }, { ms: 6, kw: 1.66 }, { ms: 7, kw: 2.86 }, { ms: 8, kw: 4.5 }, { ms: 9, kw: 6.62 }, { ms: 10, kw: 9.23 }, { ms: 11, kw: 11.44 }, { ms: 12, kw: 11.95 }, { ms: 13, kw: 12 }, { ms: 14, kw: 12 }, { ms: 25, kw: 12 }],
    },
  ],
};

/** Climate of each demo site. */
export const demoClimates: Readonly<Record<string, SiteClimate>> = {
  'quorvenna-ildresk': { altitudeM: 380, airMeanC: 8.5, airSeasonalC: 6, airDiurnalC: 3, windMeanMs: 6.6, turbulenceIntensity: 0.13 },
  'pludvarro-emskeen': { altitudeM: 90, airMeanC: 6.5, airSeasonalC: 10, airDiurnalC: 3.5, windMeanMs: 6.1, turbulenceIntensity: 0.11 },
  'skarvolin-dessequa': {
    altitudeM: 640, airMeanC: 8, airSeasonalC: 9, airDiurnalC: 5,
    waterMeanC: 7, waterSeasonalC: 3, flowMeanFraction: 0.85, flowSeasonalFraction: 0.35, flowPeakDay: 135,
  },
  'vuskamel-orrotheen': {
    altitudeM: 1950, airMeanC: 6, airSeasonalC: 11, airDiurnalC: 8, windMeanMs: 5.6, turbulenceIntensity: 0.15,
    waterMeanC: 6, waterSeasonalC: 4, flowMeanFraction: 0.75, flowSeasonalFraction: 0.45, flowPeakDay: 160,
  },
};

const full = { hz: true, threePhase: true, airDensity: false } as const;
const withAir = { hz: true, threePhase: true, airDensity: true } as const;

/** Loggers, exposure and faults of each demo unit. */
export const demoUnitScenarios: Readonly<Record<string, UnitScenario>> = {
  'qv-01': { tsFormat: 'iso-local', load: 'rectifier', channels: full, exposure: 1.02, faults: [] },
  'qv-02': {
    tsFormat: 'iso-local', load: 'rectifier', channels: full, exposure: 1,
    faults: [{ kind: 'demagnetisation', onsetDays: 0, pctPerDay: 1, floorFraction: 0.8 }],
  },
  'qv-03': { tsFormat: 'iso-local', load: 'rectifier', channels: full, exposure: 0.96, faults: [] },
  'qv-04': {
    tsFormat: 'iso-utc', load: 'rectifier', channels: withAir, exposure: 1.05,
    faults: [{ kind: 'overspeed', everyS: 1800, durationS: 30, gustOverRatedWind: 1.45 }],
  },
  'pd-01': { tsFormat: 'epoch-ms', load: 'rectifier', channels: withAir, exposure: 1, faults: [] },
  'pd-02': {
    tsFormat: 'epoch-ms', load: 'rectifier', channels: full, exposure: 0.98,
    faults: [{ kind: 'speed-sensor-low', onsetDays: 5, readsLowPct: 5 }],
  },
  'pd-03': {
    tsFormat: 'epoch-ms', load: 'rectifier', channels: full, exposure: 1.04,
    faults: [{ kind: 'offline', afterS: 240, forS: 1200, gapStartDays: 5.5, gapHours: 4 }],
  },
  // A basic charge controller: one line voltage, one current, no frequency.
  'pd-04': { tsFormat: 'epoch-ms', load: 'rectifier', channels: { hz: false, threePhase: false, airDensity: false }, exposure: 0.93, faults: [] },
  'sd-01': { tsFormat: 'iso-utc', load: 'rectifier', channels: full, exposure: 1, faults: [] },
  'sd-02': {
    tsFormat: 'iso-utc', load: 'rectifier', channels: full, exposure: 1,
    faults: [{ kind: 'shorted-turn', onsetDays: 4.5, phase: 'b', emfLossPct: 8, developHours: 6, extraHeatingK: 6 }],
  },
  'sd-03': { tsFormat: 'iso-local', load: 'rectifier', channels: full, exposure: 1.1, faults: [] },
  // An older set on an electronic load controller: ballast heaters, fixed speed.
  'vo-01': { tsFormat: 'iso-local', load: 'resistive', channels: full, exposure: 0.9, faults: [] },
  'vo-02': { tsFormat: 'epoch-ms', load: 'rectifier', channels: full, exposure: 0.95, faults: [] },
  'vo-03': { tsFormat: 'iso-utc', load: 'rectifier', channels: withAir, exposure: 1, faults: [] },
};
