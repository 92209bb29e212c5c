/**
 * Samples of one unit held column by column in typed arrays, so a log of a
 * million rows costs about 52 MB instead of a million objects. Absent values
 * are NaN inside the arrays only; nothing outside this module sees a NaN.
 * Measurements are stored as 32-bit floats (7 significant digits, finer than
 * any field meter); the time stays a 64-bit float of epoch milliseconds.
 */
import type { TelemetrySample } from '@/lib/contract/telemetry';

/** The measurement fields the diagnosis reads. */
export const DIAGNOSIS_FIELDS = ['rpm', 'hz', 'vab', 'vbc', 'vca', 'ia', 'ib', 'ic', 'kw', 'statorC', 'ambientC'] as const;
export type DiagnosisField = (typeof DIAGNOSIS_FIELDS)[number];

/** The part of a telemetry sample the diagnosis needs; absent values may be undefined or null. */
export type DiagnosisSample = { readonly ts: number } & { readonly [K in DiagnosisField]?: number | null | undefined };

const INITIAL_CAPACITY = 1024;

/** A growable column store of samples of one unit. */
export class SampleColumns {
  /** Number of samples held. */
  length = 0;
  /** Sample times, epoch ms. */
  ts: Float64Array;
  /** One column per field; NaN where the sample lacked the value. */
  readonly columns: Record<DiagnosisField, Float32Array>;

  /**
   * An empty store with room for `capacity` samples before it grows.
   * @example new SampleColumns(4096).length // 0
   */
  constructor(capacity: number = INITIAL_CAPACITY) {
    if (!Number.isInteger(capacity) || capacity < 1) throw new RangeError(`capacity must be a whole number of at least 1, got ${capacity}`);
    this.ts = new Float64Array(capacity);
    this.columns = Object.fromEntries(DIAGNOSIS_FIELDS.map((f) => [f, new Float32Array(capacity)])) as Record<DiagnosisField, Float32Array>;
  }

  /**
   * A store holding `samples` in the given order.
   * @example SampleColumns.from([{ ts: 1767225600000, rpm: 300, vab: 120 }]).length // 1
   */
  static from(samples: readonly DiagnosisSample[]): SampleColumns {
    const store = new SampleColumns(Math.max(1, samples.length));
    for (const s of samples) store.push(s);
    return store;
  }

  /**
   * Appends one sample (ts in epoch ms; other values in contract units).
   * @example store.push({ ts: 1767225600000, rpm: 300, vab: 120, hz: 60 })
   */
  push(sample: DiagnosisSample | TelemetrySample): void {
    if (!Number.isFinite(sample.ts)) throw new RangeError(`ts must be epoch milliseconds, got ${sample.ts}`);
    if (this.length === this.ts.length) this.grow();
    const i = this.length++;
    this.ts[i] = sample.ts;
    const record = sample as DiagnosisSample;
    for (const field of DIAGNOSIS_FIELDS) {
      const v = record[field];
      this.columns[field][i] = typeof v === 'number' ? v : Number.NaN;
    }
  }

  private grow(): void {
    const capacity = this.ts.length * 2;
    const ts = new Float64Array(capacity);
    ts.set(this.ts);
    this.ts = ts;
    for (const field of DIAGNOSIS_FIELDS) {
      const column = new Float32Array(capacity);
      column.set(this.columns[field]);
      this.columns[field] = column;
    }
  }
}
