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
    expect(uploads).toHaveLength(6);
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

  it("makes the demo engineer a member of two campaigns only, with one exclusion window", async () => {
    const sites = (await engineer.get("/api/sites")).body as SiteListItem[];
    expect(sites.map((site) => site.name).sort()).toEqual(["Saltpan Crest", "Tern Ridge"]);
    expect(sites.reduce((sum, site) => sum + site.campaignCount, 0)).toBe(2);
    const exclusions = await context.db.knex("exclusion").select("reason");
    expect(exclusions).toEqual([{ reason: expect.stringMatching(/Dome maintenance/) }]);
  });
});
