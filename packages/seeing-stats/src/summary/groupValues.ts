import type { GroupedValues } from '../stats/bootstrapPooledMedian.js';

export interface KeyedGroups extends GroupedValues {
  /** The key of each group, ascending. */
  keys: number[];
}

/**
 * Groups values by an integer key with a counting sort (keys ascending) and sorts each group's values,
 * so per-group percentiles and the night bootstrap can read them directly. O(n log(n / groups)).
 */
export function groupValues(keys: Int32Array, values: Float64Array): KeyedGroups {
  const count = values.length;
  if (count === 0) return { keys: [], offsets: new Int32Array([0]), values: new Float64Array(0) };
  let minimumKey = Number.POSITIVE_INFINITY;
  let maximumKey = Number.NEGATIVE_INFINITY;
  for (let index = 0; index < count; index += 1) {
    const key = keys[index] ?? 0;
    if (key < minimumKey) minimumKey = key;
    if (key > maximumKey) maximumKey = key;
  }
  // Dense slots when the key range is modest (days over decades are fine); a map otherwise.
  const span = maximumKey - minimumKey + 1;
  const slotOfKey = span <= 4 * count + 1024 ? denseSlots(keys, minimumKey, span) : sparseSlots(keys);
  const { slotKeys, slotOf } = slotOfKey;
  const slotCount = slotKeys.length;
  const offsets = new Int32Array(slotCount + 1);
  for (let index = 0; index < count; index += 1) {
    const slot = slotOf[index] ?? 0;
    offsets[slot + 1] = (offsets[slot + 1] ?? 0) + 1;
  }
  for (let slot = 0; slot < slotCount; slot += 1) offsets[slot + 1] = (offsets[slot + 1] ?? 0) + (offsets[slot] ?? 0);
  const cursor = offsets.slice(0, slotCount);
  const grouped = new Float64Array(count);
  for (let index = 0; index < count; index += 1) {
    const slot = slotOf[index] ?? 0;
    const target = cursor[slot] ?? 0;
    grouped[target] = values[index] ?? Number.NaN;
    cursor[slot] = target + 1;
  }
  for (let slot = 0; slot < slotCount; slot += 1) grouped.subarray(offsets[slot] ?? 0, offsets[slot + 1] ?? 0).sort();
  return { keys: slotKeys, offsets, values: grouped };
}

function denseSlots(keys: Int32Array, minimumKey: number, span: number): { slotKeys: number[]; slotOf: Int32Array } {
  const present = new Uint8Array(span);
  for (let index = 0; index < keys.length; index += 1) present[(keys[index] ?? 0) - minimumKey] = 1;
  const slotOfOffset = new Int32Array(span);
  const slotKeys: number[] = [];
  for (let offset = 0; offset < span; offset += 1) {
    if (present[offset] === 1) {
      slotOfOffset[offset] = slotKeys.length;
      slotKeys.push(minimumKey + offset);
    }
  }
  const slotOf = new Int32Array(keys.length);
  for (let index = 0; index < keys.length; index += 1) slotOf[index] = slotOfOffset[(keys[index] ?? 0) - minimumKey] ?? 0;
  return { slotKeys, slotOf };
}

function sparseSlots(keys: Int32Array): { slotKeys: number[]; slotOf: Int32Array } {
  const slotKeys = Array.from(new Set(keys)).sort((left, right) => left - right);
  const slotOfKey = new Map<number, number>();
  slotKeys.forEach((key, slot) => slotOfKey.set(key, slot));
  const slotOf = new Int32Array(keys.length);
  for (let index = 0; index < keys.length; index += 1) slotOf[index] = slotOfKey.get(keys[index] ?? 0) ?? 0;
  return { slotKeys, slotOf };
}
