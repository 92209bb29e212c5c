/** The finding of a Ke not corrected for magnet temperature. */
import type { MagnetMaterial } from '@/lib/contract/nameplate';
import type { Judgement } from '@/lib/diagnosis/judge';
import { finding, num, type Finding } from './finding';

/** Readable names of the magnet materials. */
const MAGNET_WORDS: Record<MagnetMaterial, string> = { ndfeb: 'NdFeB', smco: 'SmCo', ferrite: 'Ferrite' };

/**
 * no-temperature (info): no stator or ambient reading, so Ke was taken at the
 * nameplate's reference temperature; says how much the material moves per °C.
 * @example noTemperatureFinding(judge({ nameplate, samples: withoutTemperatures })).code // 'no-temperature'
 */
export function noTemperatureFinding(j: Judgement): Finding | undefined {
  if (j.insufficient || j.fit.magnetTempSource !== 'keRefC') return undefined;
  return finding(
    'no-temperature',
    'info',
    `No stator or ambient temperature readings: Ke was not corrected for magnet temperature (taken as the nameplate's reference, ${num(j.nameplate.keRefC)} °C). ` +
      `${MAGNET_WORDS[j.nameplate.magnet]} magnets change Ke by ${num(Math.abs(j.fit.coeffPctPerC), 3)} % per °C.`,
  );
}
