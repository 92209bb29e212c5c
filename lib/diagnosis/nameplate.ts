/** What the diagnosis reads of a unit: the nameplate fields, and where a magnet temperature came from. */
import type { DiagnosisLimits, MagnetMaterial } from '@/lib/contract/nameplate';

/** The nameplate fields the diagnosis reads (a validated Nameplate fits). */
export interface DiagnosisNameplate {
  readonly ratedRpm: number;
  /** Overspeed limit, rev/min. */
  readonly maxRpm: number;
  readonly poles: number;
  readonly keVPerKrpm: number;
  readonly keRefC: number;
  readonly magnet: MagnetMaterial;
  readonly magnetTempCoeffPctPerC?: number | undefined;
  readonly phaseOhm: number;
  readonly phaseMh: number;
  readonly diagnosis?: DiagnosisLimits | undefined;
}

/** Where the magnet temperature of the used samples came from. */
export type TemperatureSource = 'statorC' | 'ambientC' | 'keRefC' | 'mixed';
