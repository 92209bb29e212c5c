/**
 * The nameplate of one generating unit (shared/contract.md, section 2), and
 * the fleet file of `npx millrace units import` (section 4).
 */
import { z } from 'zod';
import { describeValue } from './telemetry';

/** Slug of a site or unit id. */
export const SLUG = /^[a-z0-9-]{1,64}$/;

export const UNIT_KINDS = ['wind', 'hydro'] as const;
export type UnitKind = (typeof UNIT_KINDS)[number];

export const MAGNET_MATERIALS = ['ndfeb', 'smco', 'ferrite'] as const;
export type MagnetMaterial = (typeof MAGNET_MATERIALS)[number];

const slug = z
  .string({ error: (i) => `expected a slug of a-z, 0-9 and -, got ${describeValue(i.input)}` })
  .regex(SLUG, { error: (i) => `must be 1 to 64 of a-z, 0-9 and -, got ${describeValue(i.input)}` });

const positive = (what: string) =>
  z
    .number({ error: (i) => `expected a number of ${what}, got ${describeValue(i.input)}` })
    .refine((v) => v > 0, { error: (i) => `must be above 0 ${what}, got ${describeValue(i.input)}` });

const nonNegative = (what: string) =>
  z
    .number({ error: (i) => `expected a number of ${what}, got ${describeValue(i.input)}` })
    .refine((v) => v >= 0, { error: (i) => `must be 0 ${what} or more, got ${describeValue(i.input)}` });

/**
 * Diagnosis limits of one unit. Every default is common practice, not a
 * published standard (contract, section 5); a unit may set its own.
 */
export const diagnosisLimitsSchema = z
  .object({
    minSpeedFraction: z.number().gt(0).lt(1).optional(),
    minSamples: z.number().int().min(3).optional(),
    minSpeedSpanFraction: z.number().gt(0).lt(1).optional(),
    speedRatioTolerance: z.number().gt(0).lt(1).optional(),
    unbalanceAlarmPct: z.number().gt(0).lt(100).optional(),
    keAlarmRatio: z.number().gt(0).lt(2).optional(),
    keWarnRatio: z.number().gt(0).lt(2).optional(),
    maxSpeedRateFractionPerS: z.number().gt(0).max(10).optional(),
    windowHours: z.number().gt(0).max(24 * 31).optional(),
  })
  .strict();

export type DiagnosisLimits = z.infer<typeof diagnosisLimitsSchema>;

const powerCurvePoint = z.object({ ms: nonNegative('m/s'), kw: nonNegative('kW') });

/** The nameplate schema; wind and hydro fields are required by `kind`. */
export const nameplateSchema = z
  .object({
    id: slug,
    siteId: slug,
    name: z.string().min(1).max(200).optional(),
    kind: z.enum(UNIT_KINDS, { error: (i) => `must be wind or hydro, got ${describeValue(i.input)}` }),
    ratedKw: positive('kW'),
    ratedRpm: positive('rev/min'),
    maxRpm: positive('rev/min'),
    poles: z
      .number({ error: (i) => `expected a number of poles, got ${describeValue(i.input)}` })
      .refine((v) => Number.isInteger(v) && v >= 2 && v % 2 === 0, {
        error: (i) => `must be an even number, got ${describeValue(i.input)}`,
      }),
    keVPerKrpm: positive('V per 1000 rpm'),
    keRefC: z
      .number({ error: (i) => `expected a temperature in °C, got ${describeValue(i.input)}` })
      .min(-60)
      .max(200)
      .default(20),
    magnet: z.enum(MAGNET_MATERIALS, {
      error: (i) => `must be ndfeb, smco or ferrite, got ${describeValue(i.input)}`,
    }),
    magnetTempCoeffPctPerC: z
      .number({ error: (i) => `expected % per °C, got ${describeValue(i.input)}` })
      .refine((v) => v < 0 && v > -2, { error: (i) => `must be negative (% per °C, above -2), got ${describeValue(i.input)}` })
      .optional(),
    phaseOhm: nonNegative('ohm'),
    phaseMh: nonNegative('mH').default(0),
    powerCurve: z.array(powerCurvePoint).min(2).optional(),
    cutInMs: nonNegative('m/s').optional(),
    cutOutMs: positive('m/s').optional(),
    rotorDiameterM: positive('m').optional(),
    designHeadM: positive('m').optional(),
    designFlowM3s: positive('m³/s').optional(),
    efficiency: z
      .number({ error: (i) => `expected a fraction 0..1, got ${describeValue(i.input)}` })
      .refine((v) => v > 0 && v <= 1, { error: (i) => `must be above 0 and at most 1, got ${describeValue(i.input)}` })
      .optional(),
    diagnosis: diagnosisLimitsSchema.optional(),
  })
  .superRefine((np, ctx) => {
    if (np.maxRpm < np.ratedRpm) {
      ctx.addIssue({ code: 'custom', path: ['maxRpm'], message: `must be at least ratedRpm (${np.ratedRpm}), got ${np.maxRpm}` });
    }
    const need = (field: keyof typeof np) => {
      if (np[field] === undefined) ctx.addIssue({ code: 'custom', path: [field], message: `is required for a ${np.kind} unit` });
    };
    if (np.kind === 'wind') {
      need('powerCurve');
      need('cutInMs');
      need('cutOutMs');
      need('rotorDiameterM');
      if (np.cutInMs !== undefined && np.cutOutMs !== undefined && np.cutOutMs <= np.cutInMs) {
        ctx.addIssue({ code: 'custom', path: ['cutOutMs'], message: `must be above cutInMs (${np.cutInMs}), got ${np.cutOutMs}` });
      }
      np.powerCurve?.forEach((point, i) => {
        const before = np.powerCurve?.[i - 1];
        if (before !== undefined && point.ms <= before.ms) {
          ctx.addIssue({ code: 'custom', path: ['powerCurve', i, 'ms'], message: `must rise from point to point, got ${point.ms} after ${before.ms}` });
        }
      });
    } else {
      need('designHeadM');
      need('designFlowM3s');
      need('efficiency');
    }
  });

/** A validated nameplate. */
export type Nameplate = z.output<typeof nameplateSchema>;

/** IANA time-zone check through the platform's own zone database. */
export function isIanaTimeZone(name: string): boolean {
  try {
    new Intl.DateTimeFormat('en-US', { timeZone: name });
    return name.includes('/') || name === 'UTC';
  } catch {
    return false;
  }
}

export const siteSchema = z.object({
  id: slug,
  name: z.string({ error: 'expected a site name' }).trim().min(1, 'must not be empty').max(200),
  timezone: z
    .string({ error: (i) => `expected an IANA time zone such as Europe/Oslo, got ${describeValue(i.input)}` })
    .refine(isIanaTimeZone, { error: (i) => `must be an IANA time zone such as Europe/Oslo, got ${describeValue(i.input)}` }),
});

export type Site = z.output<typeof siteSchema>;

/** FLEET.json of `npx millrace units import`. */
export const fleetSchema = z
  .object({
    sites: z.array(siteSchema).default([]),
    units: z.array(nameplateSchema).default([]),
  })
  .superRefine((fleet, ctx) => {
    const seenSites = new Set<string>();
    fleet.sites.forEach((site, i) => {
      if (seenSites.has(site.id)) ctx.addIssue({ code: 'custom', path: ['sites', i, 'id'], message: `duplicates site "${site.id}"` });
      seenSites.add(site.id);
    });
    const seenUnits = new Set<string>();
    fleet.units.forEach((unit, i) => {
      if (seenUnits.has(unit.id)) ctx.addIssue({ code: 'custom', path: ['units', i, 'id'], message: `duplicates unit "${unit.id}"` });
      seenUnits.add(unit.id);
    });
  });

export type Fleet = z.output<typeof fleetSchema>;
