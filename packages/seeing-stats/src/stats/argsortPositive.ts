import { SeeingInputError } from '../errors.js';

/**
 * Indices that sort values ascending (stable), for finite values ≥ 0, by an LSD radix sort on the IEEE-754
 * bit patterns (for non-negative doubles the unsigned bit order is the numeric order): four 16-bit passes,
 * skipping a pass when every value shares that digit. Exact and O(n); on a million samples it is several times
 * faster than a comparison argsort, which lets every grouping reuse one sorted order.
 */
export function argsortPositive(values: Float64Array): Uint32Array {
  const count = values.length;
  const bits = new Uint32Array(values.buffer, values.byteOffset, count * 2);
  for (let index = 0; index < count; index += 1) {
    const value = values[index] ?? Number.NaN;
    if (!(value >= 0 && value < Number.POSITIVE_INFINITY) || Object.is(value, -0)) {
      throw new SeeingInputError(`argsortPositive needs finite values ≥ 0, got ${String(value)} at index ${index}`);
    }
  }
  let order = new Uint32Array(count);
  let spare = new Uint32Array(count);
  for (let index = 0; index < count; index += 1) order[index] = index;
  const histogram = new Uint32Array(65536);
  // Little-endian: word 2i is the low half, 2i + 1 the high half of value i (every platform Node runs on).
  const passes: { word: number; shift: number }[] = [
    { word: 0, shift: 0 },
    { word: 0, shift: 16 },
    { word: 1, shift: 0 },
    { word: 1, shift: 16 },
  ];
  for (const { word, shift } of passes) {
    histogram.fill(0);
    for (let index = 0; index < count; index += 1) {
      const digit = ((bits[2 * index + word] ?? 0) >>> shift) & 0xffff;
      histogram[digit] = (histogram[digit] ?? 0) + 1;
    }
    let nonEmpty = 0;
    for (let digit = 0; digit < 65536; digit += 1) if ((histogram[digit] ?? 0) > 0) nonEmpty += 1;
    if (nonEmpty <= 1) continue;
    let running = 0;
    for (let digit = 0; digit < 65536; digit += 1) {
      const size = histogram[digit] ?? 0;
      histogram[digit] = running;
      running += size;
    }
    for (let position = 0; position < count; position += 1) {
      const index = order[position] ?? 0;
      const digit = ((bits[2 * index + word] ?? 0) >>> shift) & 0xffff;
      const target = histogram[digit] ?? 0;
      spare[target] = index;
      histogram[digit] = target + 1;
    }
    const swap = order;
    order = spare;
    spare = swap;
  }
  return order;
}
