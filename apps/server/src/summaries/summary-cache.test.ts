import { existsSync, mkdtempSync, readFileSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { gunzipSync } from "node:zlib";
import { once } from "node:events";
import { get, type IncomingHttpHeaders } from "node:http";
import type { AddressInfo } from "node:net";
import request from "supertest";
import Database from "better-sqlite3";
import { describe, expect, it } from "vitest";
import type { SummaryResponse } from "@calmcrest/contracts";
import { createSiteAndCampaign, DATA_SAMPLES, postUpload, waitForUpload } from "../routes/test-helpers";
import { createTestServer, DEMO_PASSWORD_FOR_TESTS, SAME_ORIGIN, signedInAgent } from "../test-support";
import { BUMP_DATA_VERSION_SQL, readDataVersions } from "./data-version.server";
import { snapshotPath } from "./column-snapshot.server";
import { SampleCache } from "./sample-cache.server";
import { acceptsGzip, SummaryService } from "./summary-service.server";

const { app, context } = await createTestServer();
const lead = await signedInAgent(app, "lead");
const nativeLog = join(DATA_SAMPLES, "native-arcsec2.csv");
const lines = readFileSync(nativeLog, "utf8").trimEnd().split("\n");
const headerIndex = lines.findIndex((line) => line.startsWith("time_utc"));
const header = lines.slice(0, headerIndex + 1);
const rows = lines.slice(headerIndex + 1);

/** A log of the native sample's rows from..to (so two parts of it never share a time). */
function part(from: number, to: number): Buffer {
  return Buffer.from(`${[...header, ...rows.slice(from, to)].join("\n")}\n`);
}

async function summaryOf(campaignId: number): Promise<SummaryResponse> {
  const response = await lead.get(`/api/campaigns/${campaignId}/summary`);
  expect(response.status).toBe(200);
  return response.body as SummaryResponse;
}

async function campaignWithSamples(from: number, to: number) {
  const { site, campaign } = await createSiteAndCampaign(lead);
  const upload = await waitForUpload(lead, (await postUpload(lead, campaign.id, part(from, to), `rows-${from}-${to}.csv`)).body.upload.id);
  expect(upload.status).toBe("done");
  return { site, campaign, upload };
}

describe("answers in gzip", () => {
  it("reads Accept-Encoding as RFC 9110 does: gzip, x-gzip or * with a q above 0", () => {
    expect(acceptsGzip("gzip, deflate, br, zstd")).toBe(true);
    expect(acceptsGzip("br;q=1.0, GZip;q=0.5")).toBe(true);
    expect(acceptsGzip("*")).toBe(true);
    expect(acceptsGzip("x-gzip")).toBe(true);
    expect(acceptsGzip("gzip;q=0")).toBe(false);
    expect(acceptsGzip("gzip; q=0.000")).toBe(false);
    expect(acceptsGzip("deflate, br")).toBe(false);
    expect(acceptsGzip("identity")).toBe(false);
    expect(acceptsGzip("")).toBe(false);
    expect(acceptsGzip(undefined)).toBe(false);
  });

  it("sends the same JSON compressed to a client that accepts gzip and as it is to one that does not, under one ETag", async () => {
    const { campaign } = await campaignWithSamples(0, 300);
    const url = `/api/campaigns/${campaign.id}/summary`;
    // Over a real socket with node:http, which (unlike supertest) hands over the bytes as they were sent.
    const signIn = await request(app).post("/api/auth/sign-in").set(SAME_ORIGIN).send({ email: "lead@calmcrest.test", password: DEMO_PASSWORD_FOR_TESTS });
    const cookie = (signIn.headers["set-cookie"] as unknown as string[]).map((line) => line.split(";")[0]).join("; ");
    const server = app.listen(0, "127.0.0.1");
    await once(server, "listening");
    const { port } = server.address() as AddressInfo;
    const raw = (encoding: string) =>
      new Promise<{ status: number; headers: IncomingHttpHeaders; body: Buffer }>((resolve, reject) => {
        get({ host: "127.0.0.1", port, path: url, headers: { cookie, "accept-encoding": encoding } }, (response) => {
          const chunks: Buffer[] = [];
          response.on("data", (chunk: Buffer) => chunks.push(chunk));
          response.on("end", () => resolve({ status: response.statusCode ?? 0, headers: response.headers, body: Buffer.concat(chunks) }));
        }).on("error", reject);
      });
    const plain = await raw("identity");
    const zipped = await raw("gzip, deflate, br");
    expect(plain.status).toBe(200);
    expect(zipped.status).toBe(200);
    expect(plain.headers["content-encoding"]).toBeUndefined();
    expect(zipped.headers["content-encoding"]).toBe("gzip");
    expect(plain.headers.vary).toMatch(/Accept-Encoding/i);
    expect(zipped.headers.vary).toMatch(/Accept-Encoding/i);
    server.close();
    const plainBody = plain.body;
    const zippedBody = zipped.body;
    expect(zippedBody.byteLength).toBeLessThan(plainBody.byteLength / 2);
    expect(gunzipSync(zippedBody).equals(plainBody)).toBe(true);
    expect(JSON.parse(plainBody.toString("utf8"))).toMatchObject({ kind: "campaign" });
    // One weak ETag for both encodings: either client holding it gets 304.
    expect(zipped.headers.etag).toBe(plain.headers.etag);
    expect((await lead.get(url).set("Accept-Encoding", "gzip").set("If-None-Match", String(plain.headers.etag))).status).toBe(304);
  });
});

describe("the summary cache", () => {
  it("answers a repeated summary from the cache, and gives new numbers after every change of samples or exclusions", async () => {
    const { campaign, upload } = await campaignWithSamples(0, 200);
    const first = await summaryOf(campaign.id);
    expect(first.samples.read).toBe(upload.samples.read);
    const hitsBefore = context.summaries.stats().hits;
    const again = await summaryOf(campaign.id);
    expect(again).toEqual(first);
    expect(context.summaries.stats().hits).toBe(hitsBefore + 1);
    // The answer's ETag names its data version: a client that holds it gets 304 until the data change.
    const etag = (await lead.get(`/api/campaigns/${campaign.id}/summary`)).headers.etag ?? "";
    expect(etag).toMatch(/^W\/"/);
    expect((await lead.get(`/api/campaigns/${campaign.id}/summary`).set("If-None-Match", etag)).status).toBe(304);

    // An exclusion over the first half of the samples: fewer accepted, counted under excluded_window.
    const firstTime = rows[0]?.split(",")[0] ?? "";
    const middleTime = rows[100]?.split(",")[0] ?? "";
    const added = await lead.post(`/api/campaigns/${campaign.id}/exclusions`).set(SAME_ORIGIN).send({ from: firstTime, to: middleTime, reason: "dome maintenance" });
    expect(added.status).toBe(201);
    expect((await lead.get(`/api/campaigns/${campaign.id}/summary`).set("If-None-Match", etag)).status).toBe(200);
    const excluded = await summaryOf(campaign.id);
    expect(excluded.samples.accepted).toBeLessThan(first.samples.accepted);
    // Every accepted sample that left was excluded (an excluded sample some filter refuses anyway is counted once, as excluded).
    expect(excluded.samples.rejectedByReason.excluded_window).toBeGreaterThanOrEqual(first.samples.accepted - excluded.samples.accepted);

    // Removing it gives the first numbers back; a second upload adds its samples.
    expect((await lead.delete(`/api/campaigns/${campaign.id}/exclusions/${(added.body as { id: number }).id}`).set(SAME_ORIGIN)).status).toBe(204);
    expect(await summaryOf(campaign.id)).toEqual(first);
    const second = await waitForUpload(lead, (await postUpload(lead, campaign.id, part(200, 300), "more.csv")).body.upload.id);
    expect(second.status).toBe("done");
    const more = await summaryOf(campaign.id);
    expect(more.samples.accepted).toBe(first.samples.accepted + second.samples.accepted);
    expect(more.samples.read).toBe(first.samples.read + second.samples.read);
  });

  it("gives new numbers when an upload is withdrawn and the first ones again when it is restored", async () => {
    const { campaign } = await campaignWithSamples(0, 100);
    const one = await summaryOf(campaign.id);
    const second = await waitForUpload(lead, (await postUpload(lead, campaign.id, part(100, 200), "second.csv")).body.upload.id);
    const both = await summaryOf(campaign.id);
    expect(both.samples.accepted).toBeGreaterThan(one.samples.accepted);
    expect((await lead.post(`/api/uploads/${second.id}/withdraw`).set(SAME_ORIGIN).send({ reason: "sent to the wrong campaign" })).status).toBe(200);
    expect(await summaryOf(campaign.id)).toEqual(one);
    expect((await lead.post(`/api/uploads/${second.id}/restore`).set(SAME_ORIGIN).send({})).status).toBe(200);
    expect(await summaryOf(campaign.id)).toEqual(both);
  });

  it("raises a campaign's data version exactly when its samples or exclusions change, not for other edits", async () => {
    const { site, campaign } = await campaignWithSamples(0, 40);
    const version = () => readDataVersions(context.db.sqlite, [campaign.id])[0];
    const afterIngest = version();
    expect(afterIngest).toBe(1);
    await lead.patch(`/api/sites/${site.id}`).set(SAME_ORIGIN).send({ notes: "windy saddle" });
    await lead.patch(`/api/campaigns/${campaign.id}`).set(SAME_ORIGIN).send({ notes: "second trip" });
    expect(version()).toBe(afterIngest);
    const added = await lead.post(`/api/campaigns/${campaign.id}/exclusions`).set(SAME_ORIGIN).send({ from: "2024-01-01T00:00:00Z", to: "2024-01-02T00:00:00Z", reason: "cloud" });
    expect(added.status).toBe(201);
    expect(version()).toBe(2);
  });

  it("never serves a summary from before a change committed on another connection, even before the main thread hears of it", async () => {
    const { campaign } = await campaignWithSamples(0, 60);
    const before = await summaryOf(campaign.id);
    // What the ingest worker does in its own transaction: new samples (the same a week later) and the version, in one commit. Nobody
    // tells the main thread (no 'done' message, no after-commit hook).
    const elsewhere = new Database(context.db.file);
    try {
      elsewhere.transaction(() => {
        const stored = elsewhere.prepare("SELECT * FROM sample WHERE campaign_id = ?").all(campaign.id) as Record<string, number>[];
        const insert = elsewhere.prepare(
          "INSERT INTO sample (campaign_id, time_ms, upload_id, seeing_arcsec, r0_cm, zenith_deg, sun_alt_deg, flux, anisotropic) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?)",
        );
        for (const sample of stored) {
          insert.run(sample.campaign_id, Number(sample.time_ms) + 7 * 86_400_000, sample.upload_id, sample.seeing_arcsec, sample.r0_cm, sample.zenith_deg, sample.sun_alt_deg, sample.flux, sample.anisotropic);
        }
        elsewhere.prepare(BUMP_DATA_VERSION_SQL).run(campaign.id);
      })();
    } finally {
      elsewhere.close();
    }
    const after = await summaryOf(campaign.id);
    expect(after.samples.accepted).toBe(2 * before.samples.accepted);
  });

  it("while an exclusion is being added, requests made after it committed all see it, and earlier ones see one state or the other", async () => {
    const { campaign } = await campaignWithSamples(0, 200);
    const before = await summaryOf(campaign.id);
    const during = Array.from({ length: 12 }, () => summaryOf(campaign.id));
    const added = await lead
      .post(`/api/campaigns/${campaign.id}/exclusions`)
      .set(SAME_ORIGIN)
      .send({ from: rows[0]?.split(",")[0], to: rows[100]?.split(",")[0], reason: "dome maintenance" });
    expect(added.status).toBe(201);
    const after = await Promise.all(Array.from({ length: 12 }, () => summaryOf(campaign.id)));
    const excludedAccepted = after[0]?.samples.accepted ?? 0;
    expect(excludedAccepted).toBeLessThan(before.samples.accepted);
    for (const summary of after) expect(summary.samples.accepted).toBe(excludedAccepted);
    for (const summary of await Promise.all(during)) expect([before.samples.accepted, excludedAccepted]).toContain(summary.samples.accepted);
  });

  it("computes identical concurrent requests once (single flight)", async () => {
    const { campaign } = await campaignWithSamples(0, 300);
    const computationsBefore = context.summaries.stats().computations;
    const answers = await Promise.all(Array.from({ length: 8 }, () => summaryOf(campaign.id)));
    expect(context.summaries.stats().computations).toBe(computationsBefore + 1);
    for (const answer of answers) expect(answer).toEqual(answers[0]);
  });

  it("treats a filter at its default and no filter as the same request, and a different filter as another", async () => {
    const { campaign } = await campaignWithSamples(0, 300);
    const plain = await summaryOf(campaign.id);
    const computations = context.summaries.stats().computations;
    const explicit = await lead.get(`/api/campaigns/${campaign.id}/summary?maxZenithDeg=60`);
    expect(explicit.body).toEqual(plain);
    expect(context.summaries.stats().computations).toBe(computations);
    const stricter = await lead.get(`/api/campaigns/${campaign.id}/summary?maxZenithDeg=10`);
    expect(stricter.status).toBe(200);
    expect(context.summaries.stats().computations).toBe(computations + 1);
  });
});

describe("memory bounds", () => {
  it("keep at most the configured bytes of answers, dropping the least recently used", async () => {
    const { site, campaign } = await campaignWithSamples(0, 300);
    // First measure each answer (with its key) in a service without a bound, then bound a new one to hold the last two.
    const measure = new SummaryService({ dbFile: context.db.file, sqlite: context.db.sqlite, workers: 1 });
    const campaigns = await context.store.campaigns.listByIds([campaign.id]);
    const siteRow = (await context.store.sites.forUser({ id: "", role: "admin" } as never, site.id)).site;
    const askOf = (service: SummaryService) => (maxZenithDeg: number) =>
      service.summary({ kind: "campaign", site: siteRow, campaigns, query: { maxZenithDeg }, ingestRejections: () => context.store.uploads.ingestRejections([campaign.id]) });
    const sizes: number[] = [];
    for (const limit of [10, 20, 30, 40, 50, 60]) {
      const before = measure.stats().cachedBytes;
      await askOf(measure)(limit);
      sizes.push(measure.stats().cachedBytes - before);
    }
    await measure.close();
    const [, , , third = 0, second = 0, last = 0] = sizes;
    expect(third).toBeGreaterThan(1000);
    const maxBytes = second + last + Math.floor(third / 2);
    const small = new SummaryService({ dbFile: context.db.file, sqlite: context.db.sqlite, workers: 1, resultCacheMaxBytes: maxBytes });
    try {
      const ask = askOf(small);
      for (const limit of [10, 20, 30, 40, 50, 60]) await ask(limit);
      const stats = small.stats();
      expect(stats.cachedBytes).toBeLessThanOrEqual(maxBytes);
      expect(stats.cachedAnswers).toBe(2);
      // The newest answer is kept, the oldest was dropped.
      const computations = stats.computations;
      await ask(60);
      expect(small.stats().computations).toBe(computations);
      await ask(10);
      expect(small.stats().computations).toBe(computations + 1);
    } finally {
      await small.close();
    }
  });

  it("keep at most the configured bytes of sample columns, except those the running computation needs", async () => {
    const a = await campaignWithSamples(0, 100);
    const b = await campaignWithSamples(100, 200);
    const connection = new Database(context.db.file, { readonly: true });
    try {
      // 100 samples: 4 100 bytes of columns, 1 200 more with the sort. Room for one campaign only.
      expect(a.upload.samples.accepted).toBeGreaterThan(90);
      const cache = new SampleCache(connection, { maxBytes: 8_000 });
      cache.sync([a.campaign.id, b.campaign.id]);
      cache.seeingSort(a.campaign.id);
      cache.seeingSort(b.campaign.id);
      // Both are pinned while the computation runs, even though together they exceed the bound.
      expect(cache.heldCampaigns()).toEqual([a.campaign.id, b.campaign.id]);
      cache.unpin([a.campaign.id, b.campaign.id]);
      expect(cache.heldCampaigns()).toEqual([b.campaign.id]);
      expect(cache.bytesHeld).toBeLessThanOrEqual(8_000);
    } finally {
      connection.close();
    }
  });

  it("read a campaign's columns and sort from its snapshot file only while the file matches the campaign's version and samples", async () => {
    const { campaign } = await campaignWithSamples(300, 420);
    const snapshotDir = mkdtempSync(join(tmpdir(), "calmcrest-snapshots-"));
    const reader = new Database(context.db.file, { readonly: true });
    try {
      // A first worker reads the rows from SQLite and, with the sort made, writes the snapshot.
      const first = new SampleCache(reader, { snapshotDir });
      first.sync([campaign.id]);
      const fromRows = { columns: first.columns(campaign.id), sort: first.seeingSort(campaign.id) };
      first.unpin([campaign.id]);
      const file = snapshotPath(snapshotDir, campaign.id);
      expect(existsSync(file)).toBe(true);

      // A restarted worker gets the very same columns and sort from the file.
      const second = new SampleCache(reader, { snapshotDir });
      second.sync([campaign.id]);
      const fromFile = { columns: second.columns(campaign.id), sort: second.seeingSort(campaign.id) };
      expect(Array.from(fromFile.columns.timeMs)).toEqual(Array.from(fromRows.columns.timeMs));
      expect(Array.from(fromFile.columns.seeingArcsec)).toEqual(Array.from(fromRows.columns.seeingArcsec));
      expect(Array.from(fromFile.columns.zenithDeg)).toEqual(Array.from(fromRows.columns.zenithDeg));
      expect(Array.from(fromFile.columns.sunAltDeg)).toEqual(Array.from(fromRows.columns.sunAltDeg));
      expect(Array.from(fromFile.columns.flux)).toEqual(Array.from(fromRows.columns.flux));
      expect(Array.from(fromFile.columns.anisotropic ?? [])).toEqual(Array.from(fromRows.columns.anisotropic ?? []));
      expect(Array.from(fromFile.sort.order)).toEqual(Array.from(fromRows.sort.order));
      expect(Array.from(fromFile.sort.sorted)).toEqual(Array.from(fromRows.sort.sorted));
      second.unpin([campaign.id]);

      // It really is the file that is read: a value changed in the file (header intact) comes back as changed.
      const bytes = readFileSync(file);
      const headerBytes = 80;
      bytes.writeDoubleLE(123.5, headerBytes + 8 * fromRows.columns.count + 8); // seeingArcsec[1]
      writeFileSync(file, bytes);
      const third = new SampleCache(reader, { snapshotDir });
      third.sync([campaign.id]);
      expect(third.columns(campaign.id).seeingArcsec[1]).toBe(123.5);
      third.unpin([campaign.id]);

      // A sample changed in the database (here without raising the version, as a hand edit would) no longer
      // matches the file's fingerprint: the rows are read again, with the new value.
      const writer = new Database(context.db.file);
      try {
        writer.prepare("UPDATE sample SET seeing_arcsec = seeing_arcsec + 0.25 WHERE campaign_id = ? AND time_ms = ?").run(campaign.id, fromRows.columns.timeMs[2]);
      } finally {
        writer.close();
      }
      const fourth = new SampleCache(reader, { snapshotDir });
      fourth.sync([campaign.id]);
      expect(fourth.columns(campaign.id).seeingArcsec[2]).toBeCloseTo((fromRows.columns.seeingArcsec[2] ?? 0) + 0.25, 12);
      expect(fourth.columns(campaign.id).seeingArcsec[1]).toBe(fromRows.columns.seeingArcsec[1]);
      fourth.unpin([campaign.id]);
    } finally {
      reader.close();
    }
  });
});
