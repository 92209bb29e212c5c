/**
 * Validated samples of one message held compactly while they wait for their
 * batch: times and values in Float64Arrays, NaN for an absent value. A sample
 * object costs some 300 bytes of heap; a row of the block 128. Values keep
 * the device's double (its shortest decimal is what COPY sends); the `real`
 * columns round them to float4, and the rollups do the same.
 */
import { VALUE_FIELDS, type TelemetrySample, type ValueField } from '@/lib/contract/telemetry';

export { VALUE_FIELDS, type ValueField };

/** Position of each field in a row of the block. */
export const FIELD_INDEX = Object.fromEntries(VALUE_FIELDS.map((f, i) => [f, i])) as Record<ValueField, number>;

const WIDTH = VALUE_FIELDS.length;

export interface SampleBlock {
  /** Samples held. */
  count: number;
  /** Sample times, epoch ms. */
  ts: Float64Array;
  /** count × VALUE_FIELDS.length values, row by row; NaN where absent. */
  values: Float64Array;
}

/** An empty block with room for `capacity` samples. */
export function createSampleBlock(capacity: number): SampleBlock {
  // One buffer for times and values: one allocation a message, not two.
  const all = new Float64Array(capacity * (WIDTH + 1));
  const values = all.subarray(capacity).fill(Number.NaN);
  return { count: 0, ts: all.subarray(0, capacity), values };
}

/** The empty block (shared; never written). */
export const EMPTY_BLOCK: SampleBlock = Object.freeze(createSampleBlock(0)) as SampleBlock;

/** Appends a validated sample; the block must have room. */
export function appendSample(block: SampleBlock, sample: TelemetrySample): void {
  const i = block.count++;
  block.ts[i] = sample.ts;
  const row = i * WIDTH;
  for (let f = 0; f < WIDTH; f++) {
    const v = sample[VALUE_FIELDS[f]!];
    if (v !== undefined) block.values[row + f] = v;
  }
}

/** A block of the given samples. */
export function sampleBlockOf(samples: readonly TelemetrySample[]): SampleBlock {
  const block = createSampleBlock(samples.length);
  for (const s of samples) appendSample(block, s);
  return block;
}

/** One value of sample `i`, undefined when absent. */
export function valueAt(block: SampleBlock, i: number, field: ValueField): number | undefined {
  const v = block.values[i * WIDTH + FIELD_INDEX[field]]!;
  return Number.isNaN(v) ? undefined : v;
}

/** Sample `i` as an object. */
export function sampleAt(block: SampleBlock, i: number): TelemetrySample {
  const s: Record<string, number> = { ts: block.ts[i]! };
  for (let f = 0; f < WIDTH; f++) {
    const v = block.values[i * WIDTH + f]!;
    if (!Number.isNaN(v)) s[VALUE_FIELDS[f]!] = v;
  }
  return s as unknown as TelemetrySample;
}

/** Width of a row (values per sample). */
export const BLOCK_WIDTH = WIDTH;
