import { describe, expect, it } from 'vitest';
import { heapProblem } from './heap';

describe('heapProblem', () => {
  it('accepts the default buffer under the heap bound of the ingest script (184 MB on Node 20)', () => {
    expect(heapProblem(200_000, 40_000, 184)).toBeUndefined();
  });

  it('refuses a buffer the heap cannot hold, naming the variable and the flag to raise', () => {
    const problem = heapProblem(1_000_000, 20_000, 184);
    expect(problem).toMatch(/^INGEST_BUFFER_SAMPLES=1000000 needs about \d+ MB of heap, but this process may use 184 MB/);
    expect(problem).toMatch(/--max-old-space-size/);
  });

  it('grows with the buffer and the batch', () => {
    expect(heapProblem(400_000, 20_000, 184)).toBeDefined();
    expect(heapProblem(400_000, 20_000, 400)).toBeUndefined();
  });
});
