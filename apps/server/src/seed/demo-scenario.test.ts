import { describe, expect, it } from "vitest";
import type { SiteListItem } from "@calmcrest/contracts";
import { createTestServer, signedInAgent } from "../test-support";
import { DEMO_SITES, seedDemoScenario } from "./demo-scenario";

// The demo scenario at a tenth of its length (the full one is the same code with longer logs).
const { app, context } = await createTestServer();
await seedDemoScenario(context, { nightsScale: 0.1 });
const lead = await signedInAgent(app, "lead");
const engineer = await signedInAgent(app, "engineer");

describe("the demo scenario", () => {
  it("creates the four invented ridges with their campaigns, all uploads ingested", async () => {
    const sites = (await lead.get("/api/sites")).body as SiteListItem[];
    expect(sites.map((site) => site.name).sort()).toEqual(DEMO_SITES.map((site) => site.name).sort());
    const uploads = await context.db.knex("upload").select<{ status: string; rows_read: number; samples_accepted: number }[]>("status", "rows_read", "samples_accepted");
    expect(uploads).toHaveLength(7);
    for (const upload of uploads) {
      expect(upload.status).toBe("done");
      expect(upload.samples_accepted).toBeGreaterThan(1000);
    }
    for (const site of sites) expect(site.summary?.samples).toBeGreaterThan(1000);
  });

  it("orders the ridges by median seeing as the invented scenario intends, within 0.5 to 1.2 arcsec", async () => {
    const sites = (await lead.get("/api/sites")).body as SiteListItem[];
    const medians = new Map(sites.map((site) => [site.name, site.summary?.median ?? Number.NaN]));
    for (const median of medians.values()) {
      expect(median).toBeGreaterThan(0.5);
      expect(median).toBeLessThan(1.2);
    }
    expect(medians.get("Quartz Shoulder")).toBeLessThan(medians.get("Condor Spur") ?? 0);
  });

  it("has two campaigns at different ridges whose logs cover the same 48 nights, so they can be paired", () => {
    // At full length (this file seeds a tenth, which cuts each log short from its start) the logs' nights are
    // startDate .. startDate + nights − 1; the summer mast's all fall inside the low tower's.
    const logOf = (name: string) => DEMO_SITES.flatMap((site) => site.campaigns).find((campaign) => campaign.name === name)?.logs[0];
    const span = (name: string) => {
      const log = logOf(name);
      const firstMs = Date.parse(`${log?.startDate ?? ""}T00:00:00Z`);
      return { firstMs, lastMs: firstMs + ((log?.nights ?? 0) - 1) * 86_400_000 };
    };
    const summer = span("Quartz Shoulder summer mast");
    const tower = span("Tern Ridge low tower");
    const sharedNights = (Math.min(summer.lastMs, tower.lastMs) - Math.max(summer.firstMs, tower.firstMs)) / 86_400_000 + 1;
    expect(sharedNights).toBe(48);
  });

  it("makes the demo engineer a member of two campaigns only, with one exclusion window", async () => {
    const sites = (await engineer.get("/api/sites")).body as SiteListItem[];
    expect(sites.map((site) => site.name).sort()).toEqual(["Saltpan Crest", "Tern Ridge"]);
    expect(sites.reduce((sum, site) => sum + site.campaignCount, 0)).toBe(2);
    const exclusions = await context.db.knex("exclusion").select("reason");
    expect(exclusions).toEqual([{ reason: expect.stringMatching(/Dome maintenance/) }]);
  });
});
