/** The finding that states the size of the load correction against the naive ratio. */
import type { Judgement } from '@/lib/diagnosis/judge';
import { finding, num, type Finding } from './finding';

/**
 * corrections (info): the share of loaded samples, the mean EMF above the
 * terminal voltage, and the uncorrected ratio beside the corrected one.
 * @example correctionsFinding(judge({ nameplate, samples: loaded }))?.code // 'corrections'
 */
export function correctionsFinding(j: Judgement): Finding | undefined {
  const { fit } = j;
  if (j.insufficient || fit.loadCorrectionPct === undefined || fit.naive === undefined || fit.ke === undefined) return undefined;
  return finding(
    'corrections',
    'info',
    `${num(fit.loadedSharePct ?? 0)} % of used samples were under load; the EMF behind the terminals was on average ${num(fit.loadCorrectionPct, 1)} % above the terminal voltage. ` +
      `Uncorrected terminal volts per rpm give ${num(fit.naive, 3)} of nameplate, corrected ${num(fit.ke.slope, 3)}.`,
  );
}
