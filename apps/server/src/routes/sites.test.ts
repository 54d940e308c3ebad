import request from "supertest";
import { describe, expect, it } from "vitest";
import type { CampaignDetail, SiteDetail, SiteListItem, VisibleCampaign } from "@calmcrest/contracts";
import { createTestServer, SAME_ORIGIN, signedInAgent, userIdOf } from "../test-support";

const { app, context } = await createTestServer();
const lead = await signedInAgent(app, "lead");
const admin = await signedInAgent(app, "admin");
const engineer = await signedInAgent(app, "engineer");
const committee = await signedInAgent(app, "committee");

const ridge = { name: "Test Ridge", latitude: -25.5, longitude: -68.2, elevationM: 4100, notes: "windy" };
const monitor = { apertureMm: 60, baselineMm: 200, wavelengthNm: 500, heightAboveGroundM: 5, response: "g-tilt" };

async function userId(email: string): Promise<string> {
  return userIdOf(context, email);
}

describe("sites", () => {
  it("lets a survey lead create a site and answers with its detail", async () => {
    const response = await lead.post("/api/sites").set(SAME_ORIGIN).send(ridge);
    expect(response.status).toBe(201);
    const site = response.body as SiteDetail;
    expect(site).toMatchObject({ name: "Test Ridge", latitude: -25.5, longitude: -68.2, elevationM: 4100, notes: "windy", campaigns: [], summary: null });
  });

  it("lets an administrator create a site too", async () => {
    const response = await admin.post("/api/sites").set(SAME_ORIGIN).send({ ...ridge, name: "Admin Ridge" });
    expect(response.status).toBe(201);
  });

  it("refuses a site from a field engineer with 403", async () => {
    const response = await engineer.post("/api/sites").set(SAME_ORIGIN).send(ridge);
    expect(response.status).toBe(403);
  });

  it("answers 400 naming the bad fields of a new site", async () => {
    const response = await lead.post("/api/sites").set(SAME_ORIGIN).send({ name: "", latitude: 95, longitude: 0, elevationM: 100 });
    expect(response.status).toBe(400);
    expect(Object.keys(response.body.error.fields)).toEqual(expect.arrayContaining(["name", "latitude"]));
  });

  it("answers 403 to a committee member on every field route", async () => {
    expect((await committee.get("/api/sites")).status).toBe(403);
    expect((await committee.get("/api/sites/1")).status).toBe(403);
    expect((await committee.get("/api/campaigns/1")).status).toBe(403);
    expect((await committee.get("/api/uploads/1")).status).toBe(403);
    expect((await committee.get("/api/sites/1/summary")).status).toBe(403);
  });

  it("answers 401 when signed out", async () => {
    expect((await request(app).get("/api/sites")).status).toBe(401);
  });

  it("patches a site and records the change in the audit log", async () => {
    const created = (await lead.post("/api/sites").set(SAME_ORIGIN).send({ ...ridge, name: "Patch Ridge" })).body as SiteDetail;
    const response = await lead.patch(`/api/sites/${created.id}`).set(SAME_ORIGIN).send({ name: "Patched Ridge", elevationM: 4200 });
    expect(response.status).toBe(200);
    expect(response.body).toMatchObject({ name: "Patched Ridge", elevationM: 4200 });
    const audit = await context.store.audit.list({ targetType: "site", targetId: created.id });
    expect(audit.map((row: { action: string }) => row.action)).toEqual(["site.create", "site.update"]);
  });
});

describe("campaigns and access", () => {
  it("creates campaigns, shows them to leads and admins, and hides the ones an engineer is not a member of (404)", async () => {
    const site = (await lead.post("/api/sites").set(SAME_ORIGIN).send({ ...ridge, name: "Access Ridge" })).body as SiteDetail;
    const created = await lead.post(`/api/sites/${site.id}/campaigns`).set(SAME_ORIGIN).send({ name: "Mast A", monitor });
    expect(created.status).toBe(201);
    const campaign = created.body as CampaignDetail;
    expect(campaign.monitor).toEqual({
      apertureMm: 60,
      baselineMm: 200,
      wavelengthNm: 500,
      pixelScaleArcsec: null,
      exposureMs: null,
      heightAboveGroundM: 5,
      response: "g-tilt",
      responseName: "Tokovinin 2002, G-tilt",
    });
    const other = (await lead.post(`/api/sites/${site.id}/campaigns`).set(SAME_ORIGIN).send({ name: "Mast B", monitor })).body as CampaignDetail;

    expect((await admin.get(`/api/campaigns/${campaign.id}`)).status).toBe(200);
    // Not a member yet: the campaign and its site do not exist for the engineer.
    const hidden = await engineer.get(`/api/campaigns/${campaign.id}`);
    expect(hidden.status).toBe(404);
    expect(hidden.body).toEqual({ error: { code: "not_found", message: expect.any(String) } });
    expect((await engineer.get(`/api/sites/${site.id}`)).status).toBe(404);
    expect((await engineer.get(`/api/campaigns/${campaign.id}/summary`)).status).toBe(404);
    expect(((await engineer.get("/api/sites")).body as SiteListItem[]).some((item) => item.id === site.id)).toBe(false);

    const engineerId = await userId("engineer@calmcrest.test");
    expect((await lead.post(`/api/campaigns/${campaign.id}/members`).set(SAME_ORIGIN).send({ userId: engineerId })).status).toBe(403);
    const added = await admin.post(`/api/campaigns/${campaign.id}/members`).set(SAME_ORIGIN).send({ userId: engineerId });
    expect(added.status).toBe(201);
    expect((added.body as CampaignDetail).members.map((member) => member.email)).toEqual(["engineer@calmcrest.test"]);

    expect((await engineer.get(`/api/campaigns/${campaign.id}`)).status).toBe(200);
    expect((await engineer.get(`/api/campaigns/${other.id}`)).status).toBe(404);
    const siteForEngineer = (await engineer.get(`/api/sites/${site.id}`)).body as SiteDetail;
    expect(siteForEngineer.campaigns.map((item) => item.name)).toEqual(["Mast A"]);
    const list = (await engineer.get("/api/sites")).body as SiteListItem[];
    expect(list.find((item) => item.id === site.id)?.campaignCount).toBe(1);
    // The figures cover one of the site's two campaigns, and the answer says how many there are, so screens can say so.
    expect(list.find((item) => item.id === site.id)?.campaignCountAtSite).toBe(2);
    expect(siteForEngineer.campaignCountAtSite).toBe(2);
    expect(((await lead.get(`/api/sites/${site.id}`)).body as SiteDetail).campaignCount).toBe(2);

    expect((await admin.delete(`/api/campaigns/${campaign.id}/members/${engineerId}`).set(SAME_ORIGIN)).status).toBe(204);
    expect((await engineer.get(`/api/campaigns/${campaign.id}`)).status).toBe(404);
    const audit = await context.store.audit.list({ targetType: "member" });
    expect(audit.map((row: { action: string }) => row.action)).toEqual(["member.add", "member.remove"]);
  });

  it("answers 404 for a campaign id that does not exist and for a non-numeric id", async () => {
    expect((await lead.get("/api/campaigns/999999")).status).toBe(404);
    expect((await lead.get("/api/campaigns/abc")).status).toBe(404);
  });

  it("rejects a monitor whose baseline is not longer than its subaperture", async () => {
    const site = (await lead.post("/api/sites").set(SAME_ORIGIN).send({ ...ridge, name: "Bad Monitor Ridge" })).body as SiteDetail;
    const response = await lead.post(`/api/sites/${site.id}/campaigns`).set(SAME_ORIGIN).send({ name: "Bad", monitor: { apertureMm: 60, baselineMm: 50 } });
    expect(response.status).toBe(400);
    expect(response.body.error.fields["monitor.baselineMm"]).toBeDefined();
  });

  it("patches a campaign and its monitor while it has no uploads", async () => {
    const site = (await lead.post("/api/sites").set(SAME_ORIGIN).send({ ...ridge, name: "Patch Campaign Ridge" })).body as SiteDetail;
    const campaign = (await lead.post(`/api/sites/${site.id}/campaigns`).set(SAME_ORIGIN).send({ name: "C", monitor })).body as CampaignDetail;
    const response = await lead
      .patch(`/api/campaigns/${campaign.id}`)
      .set(SAME_ORIGIN)
      .send({ status: "finished", monitor: { ...monitor, heightAboveGroundM: 8, response: "sarazin-roddier" } });
    expect(response.status).toBe(200);
    expect(response.body).toMatchObject({ status: "finished", monitor: { heightAboveGroundM: 8, response: "sarazin-roddier" } });
    expect((await engineer.patch(`/api/campaigns/${campaign.id}`).set(SAME_ORIGIN).send({ status: "running" })).status).toBe(404);
  });

  it("saves a column mapping for the upload wizard", async () => {
    const site = (await lead.post("/api/sites").set(SAME_ORIGIN).send({ ...ridge, name: "Mapping Ridge" })).body as SiteDetail;
    const campaign = (await lead.post(`/api/sites/${site.id}/campaigns`).set(SAME_ORIGIN).send({ name: "M", monitor })).body as CampaignDetail;
    expect(campaign.savedMapping).toBeNull();
    const saved = { mapping: { time_utc: "Timestamp (UTC)", seeing_arcsec: "FWHM [arcsec]", airmass: "Airmass" }, units: { seeing: "arcsec" } };
    const response = await lead.put(`/api/campaigns/${campaign.id}/saved-mapping`).set(SAME_ORIGIN).send(saved);
    expect(response.status).toBe(200);
    expect((await lead.get(`/api/campaigns/${campaign.id}`)).body.savedMapping).toEqual(saved);
    expect((await lead.put(`/api/campaigns/${campaign.id}/saved-mapping`).set(SAME_ORIGIN).send({ mapping: { nonsense: "x" } })).status).toBe(400);
  });
});

describe("the visible campaigns list", () => {
  it("gives every campaign the caller can see with its site's name, in one answer, and none of the others", async () => {
    const site = (await lead.post("/api/sites").set(SAME_ORIGIN).send({ ...ridge, name: "Listing Ridge" })).body as SiteDetail;
    const shared = (await lead.post(`/api/sites/${site.id}/campaigns`).set(SAME_ORIGIN).send({ name: "Listed mast", monitor })).body as CampaignDetail;
    const hidden = (await lead.post(`/api/sites/${site.id}/campaigns`).set(SAME_ORIGIN).send({ name: "Unlisted mast", monitor })).body as CampaignDetail;
    await admin.post(`/api/campaigns/${shared.id}/members`).set(SAME_ORIGIN).send({ userId: await userId("engineer@calmcrest.test") });
    const forLead = (await lead.get("/api/campaigns")).body as VisibleCampaign[];
    expect(forLead.filter((item) => item.siteId === site.id).map((item) => [item.name, item.siteName])).toEqual([
      ["Listed mast", "Listing Ridge"],
      ["Unlisted mast", "Listing Ridge"],
    ]);
    const forEngineer = (await engineer.get("/api/campaigns")).body as VisibleCampaign[];
    expect(forEngineer.some((item) => item.id === shared.id)).toBe(true);
    expect(forEngineer.some((item) => item.id === hidden.id)).toBe(false);
    // The same campaigns as the site details list, site by site.
    const sites = (await engineer.get("/api/sites")).body as SiteListItem[];
    const fromDetails = [];
    for (const item of sites) fromDetails.push(...((await engineer.get(`/api/sites/${item.id}`)).body as SiteDetail).campaigns.map((campaign) => campaign.id));
    expect(forEngineer.map((item) => item.id)).toEqual(fromDetails);
    expect((await committee.get("/api/campaigns")).status).toBe(403);
  });
});

describe("users", () => {
  it("lets an administrator list, invite and re-role users, and no one else", async () => {
    expect((await lead.get("/api/users")).status).toBe(403);
    expect((await lead.post("/api/users/invitations").set(SAME_ORIGIN).send({ email: "x@calmcrest.test", name: "X", role: "lead" })).status).toBe(403);
    const list = await admin.get("/api/users");
    expect(list.status).toBe(200);
    expect(list.body.map((user: { email: string }) => user.email)).toEqual(expect.arrayContaining(["admin@calmcrest.test", "engineer@calmcrest.test"]));
    const created = await admin.post("/api/users/invitations").set(SAME_ORIGIN).send({ email: "New.Person@Calmcrest.test", name: "New Person", role: "engineer" });
    expect(created.status).toBe(201);
    expect(created.body).toMatchObject({ email: "new.person@calmcrest.test", role: "engineer", status: "invited", campaigns: [] });
    expect((await admin.post("/api/users/invitations").set(SAME_ORIGIN).send({ email: "new.person@calmcrest.test", name: "Again", role: "lead" })).status).toBe(409);
    const patched = await admin.patch(`/api/users/${created.body.id}`).set(SAME_ORIGIN).send({ role: "lead" });
    expect(patched.status).toBe(200);
    expect(patched.body.role).toBe("lead");
    const audit = await context.store.audit.list({ targetType: "user", targetId: created.body.id });
    expect(audit.map((row: { action: string }) => row.action)).toEqual(["user.invite", "user.role"]);
  });
});
