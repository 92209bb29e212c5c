/** The screens' number and time formatting lives in lib (the view models choose their texts with it). */
export { ago, formatEnergyKwh, formatNumber, formatPowerKw, formatRatio, formatSiteTime, formatUtc, MISSING } from '@/lib/text/format';
