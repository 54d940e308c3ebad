import { argsortPositive } from '../stats/argsortPositive.js';
import type { GroupedValues } from '../stats/bootstrapPooledMedian.js';

export interface KeyedGroups extends GroupedValues {
  /** The key of each group, ascending. */
  keys: number[];
  /** The group slot of each input value. */
  slotOf: Int32Array;
}

/**
 * Groups values by an integer key (groups in ascending key order), each group's values sorted ascending, by
 * scattering the values in globally sorted order (a stable counting sort), so no group needs its own sort.
 * `order` is the ascending argsort of values when the caller has it already. O(n) after the argsort.
 */
export function groupValues(keys: Int32Array, values: Float64Array, order: Uint32Array = argsortPositive(values)): KeyedGroups {
  const count = values.length;
  if (count === 0) return { keys: [], offsets: new Int32Array([0]), values: new Float64Array(0), slotOf: new Int32Array(0) };
  let minimumKey = Number.POSITIVE_INFINITY;
  let maximumKey = Number.NEGATIVE_INFINITY;
  for (let index = 0; index < count; index += 1) {
    const key = keys[index] ?? 0;
    if (key < minimumKey) minimumKey = key;
    if (key > maximumKey) maximumKey = key;
  }
  const { slotKeys, slotOf } = slotsOfKeys(keys, minimumKey, maximumKey);
  const slotCount = slotKeys.length;
  const offsets = new Int32Array(slotCount + 1);
  for (let index = 0; index < count; index += 1) {
    const slot = slotOf[index] ?? 0;
    offsets[slot + 1] = (offsets[slot + 1] ?? 0) + 1;
  }
  for (let slot = 0; slot < slotCount; slot += 1) offsets[slot + 1] = (offsets[slot + 1] ?? 0) + (offsets[slot] ?? 0);
  const cursor = offsets.slice(0, slotCount);
  const grouped = new Float64Array(count);
  for (let position = 0; position < count; position += 1) {
    const index = order[position] ?? 0;
    const slot = slotOf[index] ?? 0;
    const target = cursor[slot] ?? 0;
    grouped[target] = values[index] ?? Number.NaN;
    cursor[slot] = target + 1;
  }
  return { keys: slotKeys, offsets, values: grouped, slotOf };
}

/**
 * Group slots for integer keys: slotKeys = the distinct keys ascending, slotOf[i] = the slot of keys[i].
 * minimumKey and maximumKey bound the keys (the caller has usually seen them already). `into`, when given, is
 * where slotOf is written; it may be keys itself (each key is read before its slot is written over it).
 */
export function slotsOfKeys(keys: Int32Array, minimumKey: number, maximumKey: number, into?: Int32Array): { slotKeys: number[]; slotOf: Int32Array } {
  // Dense slots when the key range is modest (days over decades are fine); a map otherwise.
  const span = maximumKey - minimumKey + 1;
  return span <= 4 * keys.length + 1024 ? denseSlots(keys, minimumKey, span, into) : sparseSlots(keys, into);
}

/** `into` (optional): the array slotOf is written to, at least as long as keys; a new one otherwise. */
function slotArray(length: number, into: Int32Array | undefined): Int32Array {
  return into === undefined ? new Int32Array(length) : into.subarray(0, length);
}

function denseSlots(keys: Int32Array, minimumKey: number, span: number, into?: Int32Array): { slotKeys: number[]; slotOf: Int32Array } {
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
  const slotOf = slotArray(keys.length, into);
  for (let index = 0; index < keys.length; index += 1) slotOf[index] = slotOfOffset[(keys[index] ?? 0) - minimumKey] ?? 0;
  return { slotKeys, slotOf };
}

function sparseSlots(keys: Int32Array, into?: Int32Array): { slotKeys: number[]; slotOf: Int32Array } {
  const slotKeys = Array.from(new Set(keys)).sort((left, right) => left - right);
  const slotOfKey = new Map<number, number>();
  slotKeys.forEach((key, slot) => slotOfKey.set(key, slot));
  const slotOf = slotArray(keys.length, into);
  for (let index = 0; index < keys.length; index += 1) slotOf[index] = slotOfKey.get(keys[index] ?? 0) ?? 0;
  return { slotKeys, slotOf };
}
