/**
 * Which temperature a sample's correction takes (contract, section 5), in one
 * place for the diagnosis's Ke fit and the voltage-against-speed chart, so
 * that the chart shows exactly the EMF the verdict rests on. The formulas
 * themselves are lib/physics's (copperOhmAtFast, keTemperatureFactorFast,
 * powerFactorOfLoad, lineEmfBehindTerminals). Readings are plain numbers with
 * NaN for an absent value, as the column store keeps them.
 */
import { COPPER_REF_C } from '@/lib/physics/winding-resistance';

/**
 * Winding temperature of a sample, °C: stator, else ambient, else 20 °C.
 * @example windingTempC(NaN, 12) // 12
 */
export function windingTempC(statorC: number, ambientC: number): number {
  return statorC === statorC ? statorC : ambientC === ambientC ? ambientC : COPPER_REF_C;
}

/**
 * Magnet temperature of a sample, °C: stator, else ambient, else the nameplate's reference.
 * @example magnetTempC(NaN, NaN, 20) // 20
 */
export function magnetTempC(statorC: number, ambientC: number, keRefC: number): number {
  return statorC === statorC ? statorC : ambientC === ambientC ? ambientC : keRefC;
}
