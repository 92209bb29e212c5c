/**
 * Median of a list of numbers by selection (Hoare's quickselect), linear time
 * on average, without sorting the whole list.
 */

/**
 * Median of the first `count` values (default all); undefined for an empty list.
 * @example median([3, 1, 4, 1, 5]) // 3
 */
export function median(values: ArrayLike<number>, count: number = values.length): number | undefined {
  if (!Number.isInteger(count) || count < 0 || count > values.length) {
    throw new RangeError(`count must be a whole number from 0 to ${values.length}, got ${count}`);
  }
  if (count === 0) return undefined;
  const work = new Float64Array(count);
  for (let i = 0; i < count; i++) {
    const v = values[i] as number;
    if (Number.isNaN(v)) throw new RangeError(`values[${i}] is NaN`);
    work[i] = v;
  }
  const mid = count >> 1;
  const upper = select(work, mid);
  if (count % 2 === 1) return upper;
  // After selecting `mid`, everything left of it is ≤ it; the lower middle is their maximum.
  let lower = -Infinity;
  for (let i = 0; i < mid; i++) if ((work[i] as number) > lower) lower = work[i] as number;
  return (lower + upper) / 2;
}

/** Rearranges `a` so that a[k] holds the k-th smallest value; returns it. */
function select(a: Float64Array, k: number): number {
  let lo = 0;
  let hi = a.length - 1;
  while (hi > lo) {
    // Median of three as pivot keeps sorted input linear.
    const midIdx = (lo + hi) >> 1;
    const x = a[lo] as number;
    const y = a[midIdx] as number;
    const z = a[hi] as number;
    const pivot = x < y ? (y < z ? y : x < z ? z : x) : x < z ? x : y < z ? z : y;
    let i = lo;
    let j = hi;
    while (i <= j) {
      while ((a[i] as number) < pivot) i++;
      while ((a[j] as number) > pivot) j--;
      if (i <= j) {
        const t = a[i] as number;
        a[i] = a[j] as number;
        a[j] = t;
        i++;
        j--;
      }
    }
    if (k <= j) hi = j;
    else if (k >= i) lo = i;
    else return a[k] as number;
  }
  return a[k] as number;
}
