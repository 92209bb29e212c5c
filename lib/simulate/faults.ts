/**
 * Faults that develop on demo units over a run. Each is deterministic: its
 * effect at a time depends only on the plan, the fault epoch (the moment the
 * scenario's faults start counting from) and the settings, so a history and
 * the live run that follows it tell the same story.
 */

const DAY_MS = 86_400_000;
const HOUR_MS = 3_600_000;

/**
 * Slow loss of magnet flux (heat, a short-circuit transient, corrosion of
 * the magnets): the whole machine's EMF, and so its Ke, falls linearly by
 * `pctPerDay` % of the nameplate value per day of simulated time from
 * `onsetDays`, down to `floorFraction` of the nameplate.
 */
export interface DemagnetisationFault {
  readonly kind: 'demagnetisation';
  readonly onsetDays: number;
  readonly pctPerDay: number;
  readonly floorFraction: number;
}

/**
 * Turns of one phase shorted by failed insulation: that phase's EMF falls by
 * `emfLossPct` % (growing over `developHours` as the fault spreads), so the
 * line voltages next to it drop and unbalance; the shorted loop carries a
 * circulating current that heats the winding by up to `extraHeatingK` K at
 * rated speed (its loss rises with the square of the EMF, hence of speed).
 */
export interface ShortedTurnFault {
  readonly kind: 'shorted-turn';
  readonly onsetDays: number;
  readonly phase: 'a' | 'b' | 'c';
  readonly emfLossPct: number;
  readonly developHours: number;
  readonly extraHeatingK: number;
}

/**
 * A speed pick-up that reads `readsLowPct` % low from `onsetDays` (a worn
 * toothed wheel, a mis-set gap): the reported `rpm` is low while the
 * terminal frequency `hz` stays true, since a permanent-magnet machine has
 * no slip.
 */
export interface SpeedSensorFault {
  readonly kind: 'speed-sensor-low';
  readonly onsetDays: number;
  readonly readsLowPct: number;
}

/**
 * A unit whose communications fail. Live, its connection drops uncleanly
 * `afterS` seconds after start (so the broker publishes its last will,
 * `offline`), and it comes back after `forS` seconds (never when null). In a
 * history it leaves a gap of `gapHours` from `gapStartDays`.
 */
export interface OfflineFault {
  readonly kind: 'offline';
  readonly afterS: number;
  readonly forS: number | null;
  readonly gapStartDays: number;
  readonly gapHours: number;
}

/**
 * Overspeed in a gust: every `everyS` seconds from the epoch a gust of
 * `gustOverRatedWind` times the rated wind speed lasts `durationS` seconds
 * while the speed regulation (furling or pitch) is late, so the rotor runs
 * past `maxRpm` for a few seconds.
 */
export interface OverspeedFault {
  readonly kind: 'overspeed';
  readonly everyS: number;
  readonly durationS: number;
  readonly gustOverRatedWind: number;
}

export type FaultPlan = DemagnetisationFault | ShortedTurnFault | SpeedSensorFault | OfflineFault | OverspeedFault;
export type FaultKind = FaultPlan['kind'];

/** Run-wide settings that override the plans (demo time compression, tests). */
export interface FaultSettings {
  /** Time the plans count their days from, epoch ms. */
  readonly epochMs: number;
  /** Ke loss rate of every demagnetising unit, % per day, instead of each plan's. */
  readonly demagPctPerDay?: number | undefined;
  /** Gust period of every overspeeding unit, s, instead of each plan's. */
  readonly overspeedEveryS?: number | undefined;
  /** Seconds after start the offline units drop, instead of each plan's. */
  readonly offlineAfterS?: number | undefined;
  /** Seconds the offline units stay away (null: for good), instead of each plan's. */
  readonly offlineForS?: number | null | undefined;
}

/** Effects of a unit's faults at one time, ready for the machine model. */
export interface FaultEffects {
  /** Whole-machine flux over nameplate (1 = as new). */
  readonly fluxFactor: number;
  /** EMF factor of phases a, b, c. */
  readonly phaseEmfFactors: readonly [number, number, number];
  /** Extra winding heating at rated speed, K. */
  readonly extraHeatingKAtRated: number;
  /** Reported speed over true speed. */
  readonly speedReadingFactor: number;
  /** Gust wind over rated wind while an overspeed gust blows; undefined otherwise. */
  readonly overspeedGust: number | undefined;
  /** True inside a history gap of an offline fault. */
  readonly inHistoryGap: boolean;
}

const PHASE_INDEX = { a: 0, b: 1, c: 2 } as const;

/** Checks a plan's numbers and names the bad one. */
export function validateFaultPlan(plan: FaultPlan): FaultPlan {
  const check = (name: string, value: number, ok: boolean) => {
    if (!ok || !Number.isFinite(value)) throw new RangeError(`${plan.kind} fault: ${name} is out of range, got ${value}`);
  };
  switch (plan.kind) {
    case 'demagnetisation':
      check('pctPerDay', plan.pctPerDay, plan.pctPerDay >= 0 && plan.pctPerDay <= 100);
      check('floorFraction', plan.floorFraction, plan.floorFraction > 0 && plan.floorFraction <= 1);
      break;
    case 'shorted-turn':
      check('emfLossPct', plan.emfLossPct, plan.emfLossPct > 0 && plan.emfLossPct < 50);
      check('developHours', plan.developHours, plan.developHours >= 0);
      check('extraHeatingK', plan.extraHeatingK, plan.extraHeatingK >= 0);
      break;
    case 'speed-sensor-low':
      check('readsLowPct', plan.readsLowPct, plan.readsLowPct > 0 && plan.readsLowPct < 50);
      break;
    case 'offline':
      check('afterS', plan.afterS, plan.afterS >= 0);
      if (plan.forS !== null) check('forS', plan.forS, plan.forS > 0);
      check('gapHours', plan.gapHours, plan.gapHours >= 0);
      break;
    case 'overspeed':
      check('everyS', plan.everyS, plan.everyS > plan.durationS);
      check('durationS', plan.durationS, plan.durationS > 0);
      check('gustOverRatedWind', plan.gustOverRatedWind, plan.gustOverRatedWind > 1);
      break;
  }
  return plan;
}

/**
 * Effects of `plans` at `tMs` under `settings`.
 * @example faultEffects([{ kind: 'demagnetisation', onsetDays: 0, pctPerDay: 1, floorFraction: 0.8 }], Date.UTC(2026, 0, 3), { epochMs: Date.UTC(2026, 0, 1) }).fluxFactor // 0.98
 */
export function faultEffects(plans: readonly FaultPlan[], tMs: number, settings: FaultSettings): FaultEffects {
  let fluxFactor = 1;
  const phase: [number, number, number] = [1, 1, 1];
  let extraHeatingKAtRated = 0;
  let speedReadingFactor = 1;
  let overspeedGust: number | undefined;
  let inHistoryGap = false;
  const days = (tMs - settings.epochMs) / DAY_MS;
  for (const plan of plans) {
    switch (plan.kind) {
      case 'demagnetisation': {
        const rate = settings.demagPctPerDay ?? plan.pctPerDay;
        const age = Math.max(0, days - plan.onsetDays);
        fluxFactor *= Math.max(plan.floorFraction, 1 - (rate / 100) * age);
        break;
      }
      case 'shorted-turn': {
        const ageH = (days - plan.onsetDays) * 24;
        if (ageH < 0) break;
        const grown = plan.developHours === 0 ? 1 : Math.min(1, ageH / plan.developHours);
        phase[PHASE_INDEX[plan.phase]] *= 1 - (plan.emfLossPct / 100) * grown;
        extraHeatingKAtRated += plan.extraHeatingK * grown;
        break;
      }
      case 'speed-sensor-low':
        if (days >= plan.onsetDays) speedReadingFactor *= 1 - plan.readsLowPct / 100;
        break;
      case 'offline': {
        const fromMs = settings.epochMs + plan.gapStartDays * DAY_MS;
        if (tMs >= fromMs && tMs < fromMs + plan.gapHours * HOUR_MS) inHistoryGap = true;
        break;
      }
      case 'overspeed': {
        const everyMs = (settings.overspeedEveryS ?? plan.everyS) * 1000;
        const sinceMs = (((tMs - settings.epochMs) % everyMs) + everyMs) % everyMs;
        if (sinceMs < plan.durationS * 1000) overspeedGust = plan.gustOverRatedWind;
        break;
      }
    }
  }
  return { fluxFactor, phaseEmfFactors: phase, extraHeatingKAtRated, speedReadingFactor, overspeedGust, inHistoryGap };
}

/** Live drop-out of a unit: seconds after start, and seconds away (null: for good); undefined when it never drops. */
export function liveOutage(plans: readonly FaultPlan[], settings: FaultSettings): { afterS: number; forS: number | null } | undefined {
  const plan = plans.find((p): p is OfflineFault => p.kind === 'offline');
  if (plan === undefined) return undefined;
  const forS = settings.offlineForS === undefined ? plan.forS : settings.offlineForS;
  return { afterS: settings.offlineAfterS ?? plan.afterS, forS };
}
