/**
 * The voltage-against-speed chart's table: its points cut into equal speed
 * bins, each with the mean terminal voltage and corrected EMF beside the
 * nameplate line. Pure: the screen's view model calls it.
 */
import type { EmfPoint } from './emf-points';

/** Speed bins of the chart's table. */
export const EMF_BIN_COUNT = 8;

/** One speed bin of the chart's table: mean terminal and corrected voltage beside the nameplate line at the bin's middle. */
export interface EmfBin {
  /** Speed range, rev/min: from inclusive, to exclusive (the last bin inclusive). */
  readonly from: number;
  readonly to: number;
  /** Points in the bin. */
  readonly n: number;
  /** Mean terminal line voltage, V. */
  readonly terminalV: number;
  /** Mean corrected EMF of the points that have one, V; null when none does. */
  readonly correctedV: number | null;
  /** The nameplate line at the bin's middle speed, V. */
  readonly nameplateV: number;
}

/**
 * The points cut into {@link EMF_BIN_COUNT} equal speed bins from the lowest
 * speed to the highest, empty bins left out.
 * @example emfBins([{ ts: 0, rpm: 100, terminalV: 90, correctedV: 100 }, { ts: 1, rpm: 200, terminalV: 190, correctedV: undefined }], 1000).map((b) => b.n) // [1, 1]
 */
export function emfBins(points: readonly EmfPoint[], lineKeVPerKrpm: number, binCount = EMF_BIN_COUNT): EmfBin[] {
  if (points.length === 0) return [];
  const speeds = points.map((p) => p.rpm);
  const lo = Math.min(...speeds);
  const hi = Math.max(...speeds);
  const bins: EmfBin[] = [];
  for (let i = 0; i < binCount; i++) {
    const from = lo + ((hi - lo) * i) / binCount;
    const to = lo + ((hi - lo) * (i + 1)) / binCount;
    const inBin = points.filter((p) => p.rpm >= from && (i === binCount - 1 ? p.rpm <= to : p.rpm < to));
    if (inBin.length === 0) continue;
    const corrected = inBin.flatMap((p) => (p.correctedV === undefined ? [] : [p.correctedV]));
    bins.push({
      from,
      to,
      n: inBin.length,
      terminalV: inBin.reduce((s, p) => s + p.terminalV, 0) / inBin.length,
      correctedV: corrected.length ? corrected.reduce((s, v) => s + v, 0) / corrected.length : null,
      nameplateV: (lineKeVPerKrpm * ((from + to) / 2)) / 1000,
    });
  }
  return bins;
}
