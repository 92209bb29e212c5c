/**
 * Samples above the overspeed limit (contract, section 5): how many, the
 * highest, and the time spent above it.
 */
import { rpmFromHz } from '@/lib/physics/synchronous-speed';
import type { DiagnosisNameplate } from './nameplate';
import { OVERSPEED_GAP_S } from './limits';
import type { SampleColumns } from './sample-columns';

/** Samples above the overspeed limit: how many, the highest, the time above. */
export interface OverspeedRun {
  readonly samples: number;
  /** Highest speed, rev/min, and when (a time for prose, see {@link isoTime}). */
  readonly peakRpm: number;
  readonly peakTs: string;
  /** Time above the limit in all, s. */
  readonly seconds: number;
  /** First and last sample above the limit. */
  readonly firstTs: string;
  readonly lastTs: string;
}

/**
 * A time for prose: "2026-12-02 13:30:23 UTC" (to the second; the site's zone is the screen's business).
 * @example isoTime(Date.UTC(2026, 11, 2, 13, 30, 23)) // '2026-12-02 13:30:23 UTC'
 */
export function isoTime(ms: number): string {
  return `${new Date(ms).toISOString().slice(0, 19).replace('T', ' ')} UTC`;
}

/**
 * Every sample above `maxRpm`: speed from `rpm`, or from `hz` when the sensor
 * is judged faulty (the sensor's reading where a sample has no frequency). No
 * speed floor or transient filter applies. Time above the limit counts each
 * such sample for half of each interval to a neighbour that is no more than a
 * gap apart, as the energy integration does.
 * @example overspeedRun(cols, undefined, nameplate, false)?.samples // 10
 */
export function overspeedRun(cols: SampleColumns, order: Uint32Array | undefined, nameplate: DiagnosisNameplate, fromHz: boolean): OverspeedRun | undefined {
  const n = cols.length;
  const { rpm, hz } = cols.columns;
  const hzToRpm = rpmFromHz(nameplate.poles, 1);
  let samples = 0;
  let peakRpm = -Infinity;
  let peakMs = 0;
  let firstMs = 0;
  let lastMs = 0;
  let seconds = 0;
  let prevMs = NaN;
  let prevAbove = false;
  for (let k = 0; k < n; k++) {
    const i = order === undefined ? k : (order[k] as number);
    const f = hz[i] as number;
    const speed = fromHz && f === f ? f * hzToRpm : (rpm[i] as number);
    const ms = cols.ts[i] as number;
    const above = speed > nameplate.maxRpm;
    const dtS = (ms - prevMs) / 1000;
    if (dtS > 0 && dtS <= OVERSPEED_GAP_S) seconds += (dtS / 2) * ((above ? 1 : 0) + (prevAbove ? 1 : 0));
    if (above) {
      if (samples === 0) firstMs = ms;
      lastMs = ms;
      samples++;
      if (speed > peakRpm) {
        peakRpm = speed;
        peakMs = ms;
      }
    }
    prevMs = ms;
    prevAbove = above;
  }
  if (samples === 0) return undefined;
  return { samples, peakRpm, peakTs: isoTime(peakMs), seconds, firstTs: isoTime(firstMs), lastTs: isoTime(lastMs) };
}
