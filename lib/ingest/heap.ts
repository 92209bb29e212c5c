/**
 * Whether the ingester's bounded heap can hold the buffer it is configured
 * for (measured figures in DEVELOPERS.md).
 */
import { getHeapStatistics } from 'node:v8';

/** Heap of the ingester with nothing buffered (modules, clients, a diagnosis pass), MB. */
export const BASE_HEAP_MB = 90;
/** Heap per buffered sample, bytes: its block row, its share of the message and of its batch's work. */
export const HEAP_BYTES_PER_SAMPLE = 320;

/**
 * Why this heap cannot hold the buffer the configuration asks for, or
 * undefined. The ingest script bounds the heap (package.json) so that the
 * process stays small; a larger INGEST_BUFFER_SAMPLES needs a larger bound,
 * and finding out at start beats running out of memory during an outage.
 * @example heapProblem(200_000, 40_000, 184) // undefined
 */
export function heapProblem(bufferSamples: number, batchSamples: number, limitMb = getHeapStatistics().heap_size_limit / 1048576): string | undefined {
  const needMb = BASE_HEAP_MB + ((bufferSamples + batchSamples) * HEAP_BYTES_PER_SAMPLE) / 1048576;
  if (needMb <= limitMb) return undefined;
  return (
    `INGEST_BUFFER_SAMPLES=${bufferSamples} needs about ${Math.ceil(needMb)} MB of heap, but this process may use ${Math.floor(limitMb)} MB; ` +
    `lower INGEST_BUFFER_SAMPLES, or raise --max-old-space-size in the ingest script of package.json to at least ${Math.ceil(needMb * 1.25)}`
  );
}
