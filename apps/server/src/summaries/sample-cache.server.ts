import type Database from "better-sqlite3";
import { sortPositive, type SortedSeeing } from "@calmcrest/seeing-stats";
import type { SiteSummaryBrief } from "@calmcrest/contracts";

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
  /** Per-axis seeing (variance inputs only), for the longitudinal-against-transverse check. */
  seeingLongArcsec: Float64Array;
  seeingTransArcsec: Float64Array;
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
}

/**
 * Loads each campaign's samples from SQLite once and keeps them until an ingest into that campaign finishes or
 * its exclusions change. Summaries are computed fresh from these columns on every request.
 */
export class SampleCache {
  private readonly campaigns = new Map<number, CampaignEntry>();
  /** Short site summaries for the site list, keyed by site and visible campaigns; cleared on any change. */
  readonly briefs = new Map<string, SiteSummaryBrief | null>();

  constructor(private readonly sqlite: Database.Database) {}

  private entry(campaignId: number): CampaignEntry {
    const cached = this.campaigns.get(campaignId);
    if (cached) return cached;
    const entry: CampaignEntry = { columns: this.loadColumns(campaignId), exclusions: this.loadExclusions(campaignId), seeingSort: null };
    this.campaigns.set(campaignId, entry);
    return entry;
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
    }
    return entry.seeingSort;
  }

  /** Call after an ingest into the campaign commits or its exclusions change. */
  invalidate(campaignId: number): void {
    this.campaigns.delete(campaignId);
    this.briefs.clear();
  }

  private loadColumns(campaignId: number): CampaignColumns {
    const countRow = this.sqlite.prepare("SELECT COUNT(*) AS n FROM sample WHERE campaign_id = ?").get(campaignId) as { n: number };
    const count = countRow.n;
    const columns: CampaignColumns = {
      count,
      timeMs: new Float64Array(count),
      seeingArcsec: new Float64Array(count),
      zenithDeg: new Float64Array(count),
      sunAltDeg: new Float64Array(count),
      flux: new Float64Array(count),
      seeingLongArcsec: new Float64Array(count),
      seeingTransArcsec: new Float64Array(count),
    };
    // The primary key (campaign_id, time_ms) returns them in time order without sorting.
    const rows = this.sqlite
      .prepare("SELECT time_ms, seeing_arcsec, zenith_deg, sun_alt_deg, flux, seeing_long_arcsec, seeing_trans_arcsec FROM sample WHERE campaign_id = ? ORDER BY time_ms")
      .raw()
      .iterate(campaignId) as IterableIterator<[number, number, number, number | null, number | null, number | null, number | null]>;
    let index = 0;
    for (const [timeMs, seeingArcsec, zenithDeg, sunAltDeg, flux, seeingLongArcsec, seeingTransArcsec] of rows) {
      // A concurrent ingest cannot add rows mid-read (WAL snapshot), but guard the preallocated length anyway.
      if (index >= count) break;
      columns.timeMs[index] = timeMs;
      columns.seeingArcsec[index] = seeingArcsec;
      columns.zenithDeg[index] = zenithDeg;
      columns.sunAltDeg[index] = sunAltDeg ?? Number.NaN;
      columns.flux[index] = flux ?? Number.NaN;
      columns.seeingLongArcsec[index] = seeingLongArcsec ?? Number.NaN;
      columns.seeingTransArcsec[index] = seeingTransArcsec ?? Number.NaN;
      index += 1;
    }
    return index === count ? columns : { ...columns, count: index };
  }

  private loadExclusions(campaignId: number): ExclusionWindow[] {
    const rows = this.sqlite
      .prepare("SELECT from_ms AS fromMs, to_ms AS toMs, reason FROM exclusion WHERE campaign_id = ? ORDER BY from_ms")
      .all(campaignId) as ExclusionWindow[];
    return rows;
  }
}
