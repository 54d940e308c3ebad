import type Database from "better-sqlite3";
import { sortPositive, tau0ToReference, theta0ToReference, type SortedSeeing } from "@calmcrest/seeing-stats";
import type { SiteSummaryBrief } from "@calmcrest/contracts";
import { readSnapshot, writeSnapshot, type SampleFingerprint } from "./column-snapshot.server";
import { readDataVersions } from "./data-version.server";

/**
 * A campaign's stored samples as columns in time order (typed arrays: about 40 bytes a sample).
 * Nullable values are NaN. Filters and exclusions are applied per request, never baked in.
 */
export interface CampaignColumns {
  count: number;
  timeMs: Float64Array;
  seeingArcsec: Float64Array;
  zenithDeg: Float64Array;
  sunAltDeg: Float64Array;
  flux: Float64Array;
  /**
   * Per-axis seeing (variance inputs only, NaN otherwise), for the longitudinal-against-transverse chart. Only the
   * sample series shows them, so they are read only for a task that asks (sync(ids, { axes: true })): summaries and
   * comparisons hold 16 bytes a sample less and read two columns fewer.
   */
  seeingLongArcsec?: Float64Array;
  seeingTransArcsec?: Float64Array;
  /** 1 where the sample was flagged anisotropic at ingest (the anisotropy filter), else 0 (always loaded). */
  anisotropic?: Uint8Array;
  /** τ0 and θ0 reduced to zenith and 500 nm (NaN where not logged); absent when the campaign logged none. */
  tau0Ms?: Float64Array;
  theta0Arcsec?: Float64Array;
}

export interface ExclusionWindow {
  fromMs: number;
  toMs: number;
  reason: string;
}

interface CampaignEntry {
  columns: CampaignColumns;
  exclusions: ExclusionWindow[];
  /** The seeing column's sort (the engine's sortPositive), made on first use; it does not depend on any query. */
  seeingSort: SortedSeeing | null;
  /** The campaign's data version these columns were read at (campaign_data_version; -1 when read without one). */
  version: number;
  /** Bytes of the typed arrays held (columns, and the sort once made). */
  bytes: number;
  /** What the columns were read as (version −1: read outside sync, never written to a snapshot). */
  fingerprint: SampleFingerprint;
}

/** About 41 bytes a sample: five Float64 columns and the anisotropy byte (τ0/θ0 add 8 each when logged, the two axes 16 when read); the seeing sort adds 12 more. */
function columnBytes(columns: CampaignColumns): number {
  const floatColumns = 5 + (columns.tau0Ms ? 1 : 0) + (columns.theta0Arcsec ? 1 : 0);
  return columns.timeMs.length * (floatColumns * Float64Array.BYTES_PER_ELEMENT + 1);
}

/** What sync() read in one SQLite read snapshot: the data version of each campaign, in the order asked. */
export interface CampaignSnapshot {
  versions: number[];
}

/**
 * Loads each campaign's samples from SQLite once and keeps them until they change. Summaries are computed from
 * these columns; filters and exclusions are applied per request. With a byte limit, the least recently used
 * campaigns are dropped once the columns held exceed it (never the ones the current computation uses, so one
 * summary over campaigns larger than the limit still works and holds them only while it runs).
 */
export class SampleCache {
  private readonly campaigns = new Map<number, CampaignEntry>();
  /** Short site summaries for the site list, keyed by site and visible campaigns; cleared on any change. */
  readonly briefs = new Map<string, SiteSummaryBrief | null>();
  private readonly maxBytes: number;
  private heldBytes = 0;
  /** Campaigns the running computation uses: never evicted until unpin(). */
  private readonly pinned = new Set<number>();

  /** Where column snapshots live (column-snapshot.server.ts); none without it. */
  private readonly snapshotDir: string | null;

  constructor(
    private readonly sqlite: Database.Database,
    options: { maxBytes?: number; snapshotDir?: string } = {},
  ) {
    this.maxBytes = options.maxBytes ?? Number.POSITIVE_INFINITY;
    this.snapshotDir = options.snapshotDir ?? null;
  }

  /** Bytes of sample columns (and sorts) held now. */
  get bytesHeld(): number {
    return this.heldBytes;
  }

  /** Campaign ids held now, least recently used first (for tests and the memory figures). */
  heldCampaigns(): number[] {
    return [...this.campaigns.keys()];
  }

  private entry(campaignId: number, version = -1): CampaignEntry {
    const cached = this.campaigns.get(campaignId);
    if (cached) {
      // Map order is the LRU order: move it to the end.
      this.campaigns.delete(campaignId);
      this.campaigns.set(campaignId, cached);
      return cached;
    }
    const fingerprint = this.fingerprint(campaignId, version);
    // A snapshot written at this very version with these very samples, else the rows from SQLite.
    const snapshot = this.snapshotDir !== null && version >= 0 ? readSnapshot(this.snapshotDir, fingerprint) : null;
    const columns = snapshot?.columns ?? this.loadColumns(campaignId, fingerprint);
    const seeingSort = snapshot?.sort ?? null;
    const sortBytes = seeingSort === null ? 0 : seeingSort.sorted.byteLength + seeingSort.order.byteLength;
    const entry: CampaignEntry = { columns, exclusions: this.loadExclusions(campaignId), seeingSort, version: -1, bytes: columnBytes(columns) + sortBytes, fingerprint };
    this.campaigns.set(campaignId, entry);
    this.heldBytes += entry.bytes;
    this.evict();
    return entry;
  }

  private drop(campaignId: number): void {
    const entry = this.campaigns.get(campaignId);
    if (!entry) return;
    this.campaigns.delete(campaignId);
    this.heldBytes -= entry.bytes;
  }

  private evict(): void {
    if (this.heldBytes <= this.maxBytes) return;
    // Deleting from a Map while iterating it is safe: the loop goes on with the next key.
    for (const campaignId of this.campaigns.keys()) {
      if (this.heldBytes <= this.maxBytes) return;
      if (!this.pinned.has(campaignId)) this.drop(campaignId);
    }
  }

  /**
   * Brings these campaigns up to their committed data version in ONE read snapshot (a campaign whose version
   * moved is read again, with its exclusions), so columns, exclusions and versions describe the same committed
   * state. Pins the campaigns until unpin(): call it when the computation is done.
   */
  sync(campaignIds: readonly number[], options: { axes?: boolean } = {}): CampaignSnapshot {
    for (const campaignId of campaignIds) this.pinned.add(campaignId);
    const read = this.sqlite.transaction((): CampaignSnapshot => {
      const versions = readDataVersions(this.sqlite, campaignIds);
      campaignIds.forEach((campaignId, index) => {
        const version = versions[index] ?? 0;
        const held = this.campaigns.get(campaignId);
        if (held && held.version !== version) this.drop(campaignId);
        const entry = this.entry(campaignId, version);
        entry.version = version;
        // Read in the same snapshot as the columns they sit beside.
        if (options.axes === true && entry.columns.seeingLongArcsec === undefined) this.loadAxes(campaignId, entry);
      });
      return { versions };
    });
    // A deferred transaction: no lock is taken until the first read, and a read never waits for a writer (WAL).
    return read();
  }

  /** The computation that pinned these campaigns is done: they may be evicted again. */
  unpin(campaignIds: readonly number[]): void {
    for (const campaignId of campaignIds) this.pinned.delete(campaignId);
    this.evict();
  }

  columns(campaignId: number): CampaignColumns {
    return this.entry(campaignId).columns;
  }

  exclusions(campaignId: number): ExclusionWindow[] {
    return this.entry(campaignId).exclusions;
  }

  /**
   * The campaign's seeing values in ascending order with their indices (ties in time order), kept with the columns:
   * a summary picks its samples out of it instead of sorting them again (the statistics are still computed fresh).
   */
  seeingSort(campaignId: number): SortedSeeing {
    const entry = this.entry(campaignId);
    if (entry.seeingSort === null) {
      const { seeingArcsec, count } = entry.columns;
      entry.seeingSort = sortPositive(seeingArcsec.subarray(0, count));
      // Columns read from SQLite inside sync, now with their sort: kept on disk for the next worker that needs them.
      if (this.snapshotDir !== null && entry.fingerprint.version >= 0) writeSnapshot(this.snapshotDir, entry.fingerprint, entry.columns, entry.seeingSort);
      const sortBytes = entry.seeingSort.sorted.byteLength + entry.seeingSort.order.byteLength;
      entry.bytes += sortBytes;
      this.heldBytes += sortBytes;
      this.evict();
    }
    return entry.seeingSort;
  }

  /** Call after an ingest into the campaign commits or its exclusions change. */
  invalidate(campaignId: number): void {
    this.drop(campaignId);
    this.briefs.clear();
  }

  /**
   * One scan counts the samples and the logged τ0 and θ0 values and sums the times and seeing values (the
   * fingerprint a column snapshot must match), with the campaign's wavelength (τ0 and θ0 are stored as logged;
   * the summaries want them at zenith and 500 nm like the seeing).
   */
  private fingerprint(campaignId: number, version: number): SampleFingerprint {
    const counted = this.sqlite
      .prepare("SELECT COUNT(*) AS n, COUNT(tau0_ms) AS tau0, COUNT(theta0_arcsec) AS theta0, TOTAL(time_ms) AS timeSum, TOTAL(seeing_arcsec) AS seeingTotal FROM sample WHERE campaign_id = ?")
      .get(campaignId) as { n: number; tau0: number; theta0: number; timeSum: number; seeingTotal: number };
    const campaign = this.sqlite.prepare("SELECT wavelength_nm AS wavelengthNm FROM campaign WHERE id = ?").get(campaignId) as { wavelengthNm: number | null } | undefined;
    return {
      campaignId,
      version,
      count: counted.n,
      timeSum: counted.timeSum,
      seeingTotal: counted.seeingTotal,
      tau0Count: counted.tau0,
      theta0Count: counted.theta0,
      wavelengthNm: campaign?.wavelengthNm ?? 500,
    };
  }

  private loadColumns(campaignId: number, fingerprint: SampleFingerprint): CampaignColumns {
    const count = fingerprint.count;
    const turbulence = { tau0: fingerprint.tau0Count, theta0: fingerprint.theta0Count, wavelengthNm: fingerprint.wavelengthNm };
    const wavelengthNm = turbulence.wavelengthNm ?? 500;
    const columns: CampaignColumns = {
      count,
      timeMs: new Float64Array(count),
      seeingArcsec: new Float64Array(count),
      zenithDeg: new Float64Array(count),
      sunAltDeg: new Float64Array(count),
      flux: new Float64Array(count),
      ...(turbulence.tau0 > 0 ? { tau0Ms: new Float64Array(count).fill(Number.NaN) } : {}),
      ...(turbulence.theta0 > 0 ? { theta0Arcsec: new Float64Array(count).fill(Number.NaN) } : {}),
    };
    const { tau0Ms, theta0Arcsec } = columns;
    const anisotropicFlags = new Uint8Array(count);
    columns.anisotropic = anisotropicFlags;
    // The primary key (campaign_id, time_ms) returns them in time order without sorting. τ0 and θ0 are read only
    // when the campaign logged some (each column read costs about a tenth of the row).
    const rows = this.sqlite
      .prepare(
        `SELECT time_ms, seeing_arcsec, zenith_deg, sun_alt_deg, flux, anisotropic${tau0Ms ? ", tau0_ms" : ", NULL"}${theta0Arcsec ? ", theta0_arcsec" : ", NULL"} FROM sample WHERE campaign_id = ? ORDER BY time_ms`,
      )
      .raw()
      .iterate(campaignId) as IterableIterator<
      [number, number, number, number | null, number | null, number, number | null, number | null]
    >;
    let index = 0;
    for (const [timeMs, seeingArcsec, zenithDeg, sunAltDeg, flux, anisotropic, tau0, theta0] of rows) {
      // A concurrent ingest cannot add rows mid-read (WAL snapshot), but guard the preallocated length anyway.
      if (index >= count) break;
      columns.timeMs[index] = timeMs;
      columns.seeingArcsec[index] = seeingArcsec;
      columns.zenithDeg[index] = zenithDeg;
      columns.sunAltDeg[index] = sunAltDeg ?? Number.NaN;
      columns.flux[index] = flux ?? Number.NaN;
      anisotropicFlags[index] = anisotropic === 1 ? 1 : 0;
      // A value that is not positive is left out of the τ0/θ0 figures (as in the analyzer).
      const zenithForTurbulence = Math.min(zenithDeg, 89.999);
      if (tau0Ms && tau0 !== null && tau0 > 0) tau0Ms[index] = tau0ToReference(tau0, zenithForTurbulence, wavelengthNm);
      if (theta0Arcsec && theta0 !== null && theta0 > 0) theta0Arcsec[index] = theta0ToReference(theta0, zenithForTurbulence, wavelengthNm);
      index += 1;
    }
    return index === count ? columns : { ...columns, count: index };
  }

  /** The per-axis seeing columns beside the held columns (same rows, same time order). */
  private loadAxes(campaignId: number, entry: CampaignEntry): void {
    const { count } = entry.columns;
    const seeingLongArcsec = new Float64Array(count).fill(Number.NaN);
    const seeingTransArcsec = new Float64Array(count).fill(Number.NaN);
    const rows = this.sqlite
      .prepare("SELECT seeing_long_arcsec, seeing_trans_arcsec FROM sample WHERE campaign_id = ? ORDER BY time_ms")
      .raw()
      .iterate(campaignId) as IterableIterator<[number | null, number | null]>;
    let index = 0;
    for (const [seeingLong, seeingTrans] of rows) {
      if (index >= count) break;
      seeingLongArcsec[index] = seeingLong ?? Number.NaN;
      seeingTransArcsec[index] = seeingTrans ?? Number.NaN;
      index += 1;
    }
    entry.columns.seeingLongArcsec = seeingLongArcsec;
    entry.columns.seeingTransArcsec = seeingTransArcsec;
    const axesBytes = seeingLongArcsec.byteLength + seeingTransArcsec.byteLength;
    entry.bytes += axesBytes;
    this.heldBytes += axesBytes;
  }

  private loadExclusions(campaignId: number): ExclusionWindow[] {
    const rows = this.sqlite
      .prepare("SELECT from_ms AS fromMs, to_ms AS toMs, reason FROM exclusion WHERE campaign_id = ? ORDER BY from_ms")
      .all(campaignId) as ExclusionWindow[];
    return rows;
  }
}
