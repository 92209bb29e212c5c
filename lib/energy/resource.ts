/**
 * Whether the resource a unit turns into power is there at a sample
 * (contract, section 5): wind, the measured wind speed is at least `cutInMs`
 * and below `cutOutMs`; hydro, water flows (`flowM3s` above 0).
 */
import { energyFieldsOf, type EnergyNameplate, type ResourceSample } from './energy-nameplate';

/**
 * Builds the resource test of a unit: true or false for a sample, or
 * undefined when the sample lacks the measurement (`windMs` or `flowM3s`).
 * The wind speed is judged as measured, not normalised to air density.
 * @example
 * const present = resourcePresence({ kind: 'wind', ratedKw: 10, powerCurve: [{ ms: 3, kw: 0 }, { ms: 11, kw: 10 }], cutInMs: 3, cutOutMs: 25 });
 * present({ windMs: 2.9 }) // false
 * present({ windMs: 3 }) // true
 * present({}) // undefined
 */
export function resourcePresence(nameplate: Readonly<EnergyNameplate>): (sample: ResourceSample) => boolean | undefined {
  const unit = energyFieldsOf(nameplate);
  if (unit.kind === 'wind') {
    const { cutInMs, cutOutMs } = unit;
    return (sample) => (sample.windMs === undefined ? undefined : sample.windMs >= cutInMs && sample.windMs < cutOutMs);
  }
  return (sample) => (sample.flowM3s === undefined ? undefined : sample.flowM3s > 0);
}
