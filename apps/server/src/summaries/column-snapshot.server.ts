import { existsSync, mkdirSync, openSync, closeSync, readSync, fstatSync, renameSync, rmSync, writeSync } from "node:fs";
import { dirname, join } from "node:path";
import { threadId } from "node:worker_threads";
import type { SortedSeeing } from "@calmcrest/seeing-stats";
import type { CampaignColumns } from "./sample-cache.server";

// A campaign's sample columns and seeing sort as one binary file beside the database (data/cache/columns), so a
// summary worker after a restart reads them in a few tens of milliseconds instead of a second or more of SQLite
// rows per million samples. The file names what it holds: the campaign, its data version and a fingerprint of its
// samples (count, sum of the times, total of the seeing values, as SQLite computes them in one scan) plus the
// campaign's wavelength (τ0 and θ0 are held reduced with it). A file that does not match all of them exactly is
// ignored and replaced, so it can only ever make reading faster, never give other numbers.

const MAGIC = 0x43435331; // "CCS1"
const HEADER_FLOATS = 10;
const HEADER_BYTES = HEADER_FLOATS * 8;

/** What a snapshot must match to be used: read from SQLite in the same snapshot as the data version. */
export interface SampleFingerprint {
  campaignId: number;
  version: number;
  count: number;
  /** SUM(time_ms) as SQLite gives it (an integer, read as a double). */
  timeSum: number;
  /** TOTAL(seeing_arcsec) as SQLite gives it. */
  seeingTotal: number;
  tau0Count: number;
  theta0Count: number;
  wavelengthNm: number;
}

/** Where a server keeps its column snapshots: data/cache/columns beside the database file (deleting it is always safe). */
export function columnSnapshotDir(dbFile: string): string {
  return join(dirname(dbFile), "cache", "columns");
}

export function snapshotPath(directory: string, campaignId: number): string {
  return join(directory, `campaign-${campaignId}.bin`);
}

function headerOf(fingerprint: SampleFingerprint): Float64Array {
  const { campaignId, version, count, timeSum, seeingTotal, tau0Count, theta0Count, wavelengthNm } = fingerprint;
  return Float64Array.of(MAGIC, campaignId, version, count, timeSum, seeingTotal, tau0Count, theta0Count, wavelengthNm, 0);
}

/** The typed arrays of a snapshot body, in file order (the anisotropy bytes last, so every float stays 8-byte aligned). */
function bodyArrays(columns: CampaignColumns, sort: SortedSeeing): ArrayBufferView[] {
  const count = columns.count;
  return [
    columns.timeMs.subarray(0, count),
    columns.seeingArcsec.subarray(0, count),
    columns.zenithDeg.subarray(0, count),
    columns.sunAltDeg.subarray(0, count),
    columns.flux.subarray(0, count),
    ...(columns.tau0Ms ? [columns.tau0Ms.subarray(0, count)] : []),
    ...(columns.theta0Arcsec ? [columns.theta0Arcsec.subarray(0, count)] : []),
    sort.sorted,
    sort.order,
    (columns.anisotropic ?? new Uint8Array(count)).subarray(0, count),
  ];
}

function expectedBytes(fingerprint: SampleFingerprint): number {
  const floatColumns = 6 + (fingerprint.tau0Count > 0 ? 1 : 0) + (fingerprint.theta0Count > 0 ? 1 : 0);
  return HEADER_BYTES + fingerprint.count * (floatColumns * 8 + 4 + 1);
}

/** The data version a campaign's snapshot file was written at (null without a readable file); for tests and benchmarks. */
export function snapshotVersion(directory: string, campaignId: number): number | null {
  const path = snapshotPath(directory, campaignId);
  if (!existsSync(path)) return null;
  let descriptor: number | null = null;
  try {
    descriptor = openSync(path, "r");
    const header = new Float64Array(HEADER_FLOATS);
    if (readSync(descriptor, new Uint8Array(header.buffer), 0, HEADER_BYTES, 0) !== HEADER_BYTES) return null;
    return header[0] === MAGIC && header[1] === campaignId ? (header[2] ?? null) : null;
  } catch {
    return null;
  } finally {
    if (descriptor !== null) closeSync(descriptor);
  }
}

/** Writes the snapshot (to a temporary name, then renamed, so a reader never sees half a file). Failures are only logged: the file is an optimisation. */
export function writeSnapshot(directory: string, fingerprint: SampleFingerprint, columns: CampaignColumns, sort: SortedSeeing): void {
  if (columns.count !== fingerprint.count || sort.sorted.length !== fingerprint.count) return;
  const path = snapshotPath(directory, fingerprint.campaignId);
  // Its own temporary name per process and thread: two workers of one server may write the same campaign at once,
  // and each renames a complete file of its own (the later one wins; both hold the same samples).
  const temporary = `${path}.${process.pid}-${threadId}.tmp`;
  try {
    mkdirSync(directory, { recursive: true });
    const descriptor = openSync(temporary, "w");
    try {
      for (const array of [headerOf(fingerprint), ...bodyArrays(columns, sort)]) {
        const bytes = new Uint8Array(array.buffer, array.byteOffset, array.byteLength);
        for (let written = 0; written < bytes.byteLength; ) written += writeSync(descriptor, bytes, written, bytes.byteLength - written);
      }
    } finally {
      closeSync(descriptor);
    }
    renameSync(temporary, path);
  } catch (error) {
    rmSync(temporary, { force: true });
    console.warn(`calmcrest: could not write the column snapshot ${path} (${error instanceof Error ? error.message : String(error)}); summaries read SQLite instead.`);
  }
}

/** The campaign's columns and sort from its snapshot when the file matches the fingerprint exactly, else null. */
export function readSnapshot(directory: string, fingerprint: SampleFingerprint): { columns: CampaignColumns; sort: SortedSeeing } | null {
  const path = snapshotPath(directory, fingerprint.campaignId);
  if (!existsSync(path)) return null;
  let descriptor: number | null = null;
  try {
    descriptor = openSync(path, "r");
    const size = fstatSync(descriptor).size;
    if (size !== expectedBytes(fingerprint)) return null;
    const buffer = new ArrayBuffer(size);
    const bytes = new Uint8Array(buffer);
    for (let read = 0; read < size; ) {
      const got = readSync(descriptor, bytes, read, size - read, read);
      if (got <= 0) return null;
      read += got;
    }
    const header = new Float64Array(buffer, 0, HEADER_FLOATS);
    const wanted = headerOf(fingerprint);
    for (let index = 0; index < HEADER_FLOATS; index += 1) if (!Object.is(header[index], wanted[index])) return null;
    const count = fingerprint.count;
    let offset = HEADER_BYTES;
    const floats = (): Float64Array => {
      const array = new Float64Array(buffer, offset, count);
      offset += count * 8;
      return array;
    };
    const timeMs = floats();
    const seeingArcsec = floats();
    const zenithDeg = floats();
    const sunAltDeg = floats();
    const flux = floats();
    const tau0Ms = fingerprint.tau0Count > 0 ? floats() : undefined;
    const theta0Arcsec = fingerprint.theta0Count > 0 ? floats() : undefined;
    const sorted = floats();
    const order = new Uint32Array(buffer, offset, count);
    offset += count * 4;
    const anisotropic = new Uint8Array(buffer, offset, count);
    const columns: CampaignColumns = {
      count,
      timeMs,
      seeingArcsec,
      zenithDeg,
      sunAltDeg,
      flux,
      anisotropic,
      ...(tau0Ms ? { tau0Ms } : {}),
      ...(theta0Arcsec ? { theta0Arcsec } : {}),
    };
    return { columns, sort: { sorted, order } };
  } catch {
    return null;
  } finally {
    if (descriptor !== null) closeSync(descriptor);
  }
}
