/**
 * The part of a nameplate (contract, section 2) the energy figures read, and
 * the check that a unit of its kind carries the fields they need.
 */
import type { Nameplate } from '@/lib/contract/nameplate';
import type { TelemetrySample } from '@/lib/contract/telemetry';

/** Nameplate fields the energy figures use. */
export type EnergyNameplate = Pick<
  Nameplate,
  'kind' | 'ratedKw' | 'powerCurve' | 'cutInMs' | 'cutOutMs' | 'designHeadM' | 'efficiency'
>;

/** Sample fields the expected power and the resource are judged from. */
export type ResourceSample = Readonly<Pick<TelemetrySample, 'windMs' | 'airKgM3' | 'flowM3s' | 'headM'>>;

/** A wind nameplate with its curve and cut speeds present. */
export interface WindFields {
  readonly kind: 'wind';
  readonly ratedKw: number;
  readonly powerCurve: NonNullable<Nameplate['powerCurve']>;
  readonly cutInMs: number;
  readonly cutOutMs: number;
}

/** A hydro nameplate with its design head and efficiency present. */
export interface HydroFields {
  readonly kind: 'hydro';
  readonly ratedKw: number;
  readonly designHeadM: number;
  readonly efficiency: number;
}

/**
 * Narrows a nameplate to the fields of its kind; a missing one is a programmer error (the schema requires it).
 * @example energyFieldsOf({ kind: 'hydro', ratedKw: 50, designHeadM: 12, efficiency: 0.8 }).kind // 'hydro'
 */
export function energyFieldsOf(nameplate: Readonly<EnergyNameplate>): WindFields | HydroFields {
  if (!(nameplate.ratedKw > 0) || !Number.isFinite(nameplate.ratedKw)) {
    throw new RangeError(`ratedKw must be above 0 kW, got ${nameplate.ratedKw}`);
  }
  const missing = (field: string): never => {
    throw new RangeError(`${field} is required for a ${nameplate.kind} unit, got nothing`);
  };
  if (nameplate.kind === 'wind') {
    return {
      kind: 'wind',
      ratedKw: nameplate.ratedKw,
      powerCurve: nameplate.powerCurve ?? missing('powerCurve'),
      cutInMs: nameplate.cutInMs ?? missing('cutInMs'),
      cutOutMs: nameplate.cutOutMs ?? missing('cutOutMs'),
    };
  }
  return {
    kind: 'hydro',
    ratedKw: nameplate.ratedKw,
    designHeadM: nameplate.designHeadM ?? missing('designHeadM'),
    efficiency: nameplate.efficiency ?? missing('efficiency'),
  };
}
