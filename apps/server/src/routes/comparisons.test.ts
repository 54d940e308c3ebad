import { describe, expect, it } from "vitest";
import type { ComparisonResponse, SiteListItem } from "@calmcrest/contracts";
import { seedDemoScenario } from "../seed/demo-scenario";
import { compareForUser } from "../summaries/compare.server";
import { createTestServer, SAME_ORIGIN, separateSummaryService, signedInAgent } from "../test-support";

// The demo scenario at a tenth of its length: four invented ridges, the engineer a member at two of them.
const { app, context } = await createTestServer();
await seedDemoScenario(context, { nightsScale: 0.1 });
const lead = await signedInAgent(app, "lead");
const engineer = await signedInAgent(app, "engineer");
const committee = await signedInAgent(app, "committee");
const sites = (await lead.get("/api/sites")).body as SiteListItem[];
const idOf = (name: string): number => sites.find((site) => site.name === name)?.id ?? 0;
const allFour = sites.map((site) => site.id).join(",");

describe("GET /api/comparisons", () => {
  it("compares the four demo ridges for the lead: a row each, six pairs, verdicts in words, how every number was made", async () => {
    const response = await lead.get(`/api/comparisons?sites=${allFour}&apertureM=4&bandNm=800`);
    expect(response.status).toBe(200);
    const comparison = response.body as ComparisonResponse;
    expect(comparison.rows.map((row) => row.label).sort()).toEqual(["Condor Spur", "Quartz Shoulder", "Saltpan Crest", "Tern Ridge"]);
    expect(comparison.pairs).toHaveLength(6);
    for (const row of comparison.rows) {
      expect(row.statistics?.samples).toBeGreaterThan(1000);
      expect(row.statistics?.telescope).toMatchObject({ wavelengthNm: 800, outerScaleM: 25, telescopeDiameterM: 4 });
      // At 800 nm with L0 = 25 m the predicted image is smaller than the 500 nm seeing (seeing-physics.md §4)
      expect(row.statistics?.telescope.median).toBeLessThan(row.statistics?.seeing.median ?? 0);
      expect(row.statistics?.cdf).toHaveLength(101);
      for (const campaign of row.campaigns) for (const upload of campaign.uploads) expect(upload.sha256).toMatch(/^[0-9a-f]{64}$/);
    }
    const tern = comparison.rows.find((row) => row.label === "Tern Ridge");
    // Tern Ridge pools a 6 m mast and a 2 m tower: the row says so; Quartz Shoulder is reduced with Sarazin & Roddier
    expect(tern?.warnings.map((warning) => warning.code)).toContain("mixed_monitor_heights");
    expect(comparison.coefficientSets).toEqual(expect.arrayContaining([expect.stringMatching(/Z-tilt/), expect.stringMatching(/Sarazin/)]));
    for (const pair of comparison.pairs) {
      expect(pair.paired?.sentence).toMatch(/sharper than|No clear difference|No paired verdict|No common nights/);
      expect(pair.unpaired?.note).toMatch(/mixes seasons and weather/);
    }
    expect(comparison.window).toEqual({ from: null, to: null });
    expect(comparison.filters.standard).toBe(true);
    expect(comparison.telescope.method).toMatch(/Kolb factor for D = 4 m.*L0 = 25 m, at 800 nm/);
  });

  it("changes the numbers with the window, and compares single campaigns", async () => {
    const whole = (await lead.get(`/api/comparisons?sites=${idOf("Quartz Shoulder")},${idOf("Tern Ridge")}`)).body as ComparisonResponse;
    const spring = (await lead.get(`/api/comparisons?sites=${idOf("Quartz Shoulder")},${idOf("Tern Ridge")}&from=2025-03-01&to=2025-03-31`)).body as ComparisonResponse;
    expect(spring.window).toEqual({ from: "2025-03-01", to: "2025-03-31" });
    expect(spring.rows[0]?.statistics?.samples).toBeLessThan(whole.rows[0]?.statistics?.samples ?? 0);
    const campaignIds = whole.rows.flatMap((row) => row.campaigns.map((campaign) => campaign.id));
    const byCampaign = await lead.get(`/api/comparisons?campaigns=${campaignIds.join(",")}&pairing=bins`);
    expect(byCampaign.status).toBe(200);
    const body = byCampaign.body as ComparisonResponse;
    expect(body.kind).toBe("campaigns");
    expect(body.rows.map((row) => row.label)).toContain("Tern Ridge — Tern Ridge low tower");
    expect(body.pairing).toEqual({ matching: "bins", binMinutes: 10 });
  });

  it("answers a repeated comparison from its cache until the data changes, then computes it afresh", async () => {
    const query = `/api/comparisons?sites=${idOf("Quartz Shoulder")},${idOf("Condor Spur")}`;
    const first = (await lead.get(query)).body as ComparisonResponse;
    const again = (await lead.get(query)).body as ComparisonResponse;
    expect(again.generatedAt).toBe(first.generatedAt);
    const quartz = first.rows.find((row) => row.label === "Quartz Shoulder");
    const campaignId = quartz?.campaigns[0]?.id ?? 0;
    const excluded = await lead.post(`/api/campaigns/${campaignId}/exclusions`).set(SAME_ORIGIN).send({ from: "2025-01-01", to: "2025-04-01", reason: "monitor realigned" });
    expect(excluded.status).toBe(201);
    const after = (await lead.get(query)).body as ComparisonResponse;
    expect(after.rows.find((row) => row.label === "Quartz Shoulder")?.statistics?.samples).toBeLessThan(quartz?.statistics?.samples ?? 0);
    expect(after.rows.find((row) => row.label === "Quartz Shoulder")?.campaigns[0]?.exclusions).toEqual([{ from: "2025-01-01T00:00:00.000Z", to: "2025-04-01T00:00:00.000Z", reason: "monitor realigned" }]);
    await lead.delete(`/api/campaigns/${campaignId}/exclusions/${(excluded.body as { id: number }).id}`).set(SAME_ORIGIN);
  });

  it("answers 404 to an engineer for a site outside their campaigns, and compares the two they belong to", async () => {
    const outside = await engineer.get(`/api/comparisons?sites=${idOf("Tern Ridge")},${idOf("Quartz Shoulder")}`);
    expect(outside.status).toBe(404);
    expect(Object.keys(outside.body as object)).toEqual(["error"]);
    // An id that does not exist gets the same answer as one not shared, so ids cannot be probed
    expect((await engineer.get(`/api/comparisons?sites=${idOf("Tern Ridge")},99999`)).status).toBe(404);
    const own = await engineer.get(`/api/comparisons?sites=${idOf("Tern Ridge")},${idOf("Saltpan Crest")}`);
    expect(own.status).toBe(200);
    // The engineer sees only the Tern Ridge campaign they belong to (the north mast), not the low tower
    expect((own.body as ComparisonResponse).rows[0]?.campaigns.map((campaign) => campaign.name)).toEqual(["Tern Ridge north mast"]);
  });

  it("answers 403 to the committee", async () => {
    const response = await committee.get(`/api/comparisons?sites=${allFour}`);
    expect(response.status).toBe(403);
  });

  it("answers 400 naming the parameter for one site, seven sites, an unknown id and from after to", async () => {
    const fieldsOf = async (query: string) => {
      const response = await lead.get(`/api/comparisons?${query}`);
      expect(response.status).toBe(400);
      return (response.body as { error: { fields: Record<string, string[]> } }).error.fields;
    };
    expect(await fieldsOf(`sites=${idOf("Tern Ridge")}`)).toEqual({ sites: ["sites must list 2 to 6 sites to compare; got 1."] });
    expect(await fieldsOf("sites=1,2,3,4,5,6,7")).toEqual({ sites: ["sites must list 2 to 6 sites to compare; got 7."] });
    expect(await fieldsOf(`sites=${idOf("Tern Ridge")},99999`)).toEqual({
      sites: ["sites: there is no site with id 99999. Choose the sites to compare from the list on the Compare page."],
    });
    expect(await fieldsOf(`campaigns=1,99998`)).toEqual({
      campaigns: ["campaigns: there is no campaign with id 99998. Choose the campaigns to compare from the list on the Compare page."],
    });
    expect(await fieldsOf(`sites=${allFour}&from=2025-06-02&to=2025-06-01`)).toEqual({ to: ["to must not be before from: the window must end on or after its first day."] });
  });

  it("gives the same comparison from one summary worker as from two sharing it (rows on one, pairs on the other)", async () => {
    const leadId = (await context.store.users.idByEmail("lead@calmcrest.test")) ?? "";
    const row = await context.store.users.byId(leadId);
    expect(row).toBeDefined();
    const user = { id: leadId, email: row?.email ?? "", name: row?.name ?? "", role: row?.role ?? "lead", status: row?.status ?? "active" };
    const query = { sites: sites.map((site) => site.id), bandNm: 500, outerScaleM: 31, pairing: "nights" as const };
    const answers: string[] = [];
    for (const workers of [1, 2]) {
      const summaries = separateSummaryService(context, workers);
      try {
        const { generatedAt: _generatedAt, ...answer } = await compareForUser({ ...context, summaries }, user, query);
        expect(answer.pairs.filter((pair) => pair.paired !== null)).toHaveLength(6);
        answers.push(JSON.stringify(answer));
      } finally {
        await summaries.close();
      }
    }
    expect(answers[1]).toBe(answers[0]);
  });
});
