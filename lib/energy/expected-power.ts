/**
 * Expected electrical power of a unit from its resource (contract, section 5):
 * wind, the power curve at the wind speed normalised to 1.225 kg/m³ when the
 * air density was measured; hydro, ρ·g·Q·H·η capped at the rating.
 */
import { normaliseWindSpeedMs } from './air-density';
import { energyFieldsOf, type EnergyNameplate, type ResourceSample } from './energy-nameplate';
import { hydroPowerKw } from './hydro-power';
import { powerCurveLookup } from './power-curve';

/**
 * Builds the expected-power function of a unit: kW for a sample, or
 * undefined when the sample lacks what it needs (`windMs` for wind,
 * `flowM3s` for hydro). Hydro takes the sample's `headM` when measured, else
 * the nameplate's `designHeadM`. Without `airKgM3` the wind speed is used as measured.
 * @example
 * const expectedKw = expectedPowerModel({ kind: 'hydro', ratedKw: 100, designHeadM: 10, efficiency: 0.8 });
 * expectedKw({ flowM3s: 1 }) // 78.4532
 * expectedKw({}) // undefined
 */
export function expectedPowerModel(nameplate: Readonly<EnergyNameplate>): (sample: ResourceSample) => number | undefined {
  const unit = energyFieldsOf(nameplate);
  if (unit.kind === 'wind') {
    const kwAt = powerCurveLookup({ points: unit.powerCurve, cutInMs: unit.cutInMs, cutOutMs: unit.cutOutMs });
    return (sample) => {
      if (sample.windMs === undefined) return undefined;
      const windMs = sample.airKgM3 === undefined ? sample.windMs : normaliseWindSpeedMs(sample.windMs, sample.airKgM3);
      return kwAt(windMs);
    };
  }
  return (sample) => {
    if (sample.flowM3s === undefined) return undefined;
    return Math.min(unit.ratedKw, hydroPowerKw(sample.flowM3s, sample.headM ?? unit.designHeadM, unit.efficiency));
  };
}
