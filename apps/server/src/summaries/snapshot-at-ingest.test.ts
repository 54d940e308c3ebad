import { copyFileSync, existsSync, readFileSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import Database from "better-sqlite3";
import { describe, expect, it } from "vitest";
import { createSiteAndCampaign, DATA_SAMPLES, postUpload, waitForUpload } from "../routes/test-helpers";
import { createTestServer, signedInAgent } from "../test-support";
import { columnSnapshotDir, snapshotPath, snapshotVersion } from "./column-snapshot.server";
import { readDataVersions } from "./data-version.server";
import { SampleCache } from "./sample-cache.server";

const { app, context } = await createTestServer();
const lead = await signedInAgent(app, "lead");
const lines = readFileSync(join(DATA_SAMPLES, "native-arcsec2.csv"), "utf8").trimEnd().split("\n");
const headerIndex = lines.findIndex((line) => line.startsWith("time_utc"));
const header = lines.slice(0, headerIndex + 1);
const rows = lines.slice(headerIndex + 1);
const snapshotDir = columnSnapshotDir(context.db.file);
const HEADER_BYTES = 80;

function part(from: number, to: number): Buffer {
  return Buffer.from(`${[...header, ...rows.slice(from, to)].join("\n")}\n`);
}

async function upload(campaignId: number, from: number, to: number): Promise<void> {
  const done = await waitForUpload(lead, (await postUpload(lead, campaignId, part(from, to), `rows-${from}-${to}.csv`)).body.upload.id);
  expect(done.status).toBe("done");
}

/** The ingest worker writes the snapshot just after it reports the upload done: wait for the file of this version. */
async function snapshotAt(campaignId: number, version: number): Promise<void> {
  for (let waitedMs = 0; snapshotVersion(snapshotDir, campaignId) !== version; waitedMs += 20) {
    if (waitedMs > 15_000) throw new Error(`no snapshot of campaign ${campaignId} at version ${version} (found ${String(snapshotVersion(snapshotDir, campaignId))})`);
    await new Promise((resolve) => setTimeout(resolve, 20));
  }
}

describe("the column snapshot written at ingest", () => {
  it("is written after each ingest for the new data version, is what a fresh worker reads, and a stale one is never used", async () => {
    const { campaign } = await createSiteAndCampaign(lead);
    await upload(campaign.id, 0, 150);
    const [firstVersion = -1] = readDataVersions(context.db.sqlite, [campaign.id]);
    await snapshotAt(campaign.id, firstVersion);
    const file = snapshotPath(snapshotDir, campaign.id);
    const reader = new Database(context.db.file, { readonly: true });
    try {
      // The same columns and sort as read from the rows (a cache without snapshots), for the new version.
      const fromRows = new SampleCache(reader);
      fromRows.sync([campaign.id]);
      const rowsColumns = fromRows.columns(campaign.id);
      const rowsSort = fromRows.seeingSort(campaign.id);
      const fresh = new SampleCache(reader, { snapshotDir });
      fresh.sync([campaign.id]);
      expect(Array.from(fresh.columns(campaign.id).timeMs)).toEqual(Array.from(rowsColumns.timeMs));
      expect(Array.from(fresh.columns(campaign.id).seeingArcsec)).toEqual(Array.from(rowsColumns.seeingArcsec));
      expect(Array.from(fresh.seeingSort(campaign.id).order)).toEqual(Array.from(rowsSort.order));
      fresh.unpin([campaign.id]);

      // It is the file that a fresh worker reads: a value marked in it comes back marked.
      const marked = readFileSync(file);
      marked.writeDoubleLE(99.25, HEADER_BYTES + 8 * rowsColumns.count); // seeingArcsec[0]
      writeFileSync(file, marked);
      const fromFile = new SampleCache(reader, { snapshotDir });
      fromFile.sync([campaign.id]);
      expect(fromFile.columns(campaign.id).seeingArcsec[0]).toBe(99.25);
      fromFile.unpin([campaign.id]);
      const stale = `${file}.stale`;
      copyFileSync(file, stale);

      // A second ingest raises the version and replaces the file with one of the new samples.
      await upload(campaign.id, 150, 260);
      const [secondVersion = -1] = readDataVersions(context.db.sqlite, [campaign.id]);
      expect(secondVersion).toBeGreaterThan(firstVersion);
      await snapshotAt(campaign.id, secondVersion);
      const afterSecond = new SampleCache(reader, { snapshotDir });
      afterSecond.sync([campaign.id]);
      expect(afterSecond.columns(campaign.id).count).toBeGreaterThan(rowsColumns.count);
      expect(afterSecond.columns(campaign.id).seeingArcsec[0]).toBe(rowsColumns.seeingArcsec[0]);
      afterSecond.unpin([campaign.id]);

      // The old file put back (the marked one, of the first version) is never used: the rows are read instead.
      copyFileSync(stale, file);
      const withStale = new SampleCache(reader, { snapshotDir });
      withStale.sync([campaign.id]);
      expect(withStale.columns(campaign.id).count).toBe(afterSecond.columns(campaign.id).count);
      expect(withStale.columns(campaign.id).seeingArcsec[0]).toBe(rowsColumns.seeingArcsec[0]);
      withStale.unpin([campaign.id]);
      expect(existsSync(file)).toBe(true);
    } finally {
      reader.close();
    }
  });
});
