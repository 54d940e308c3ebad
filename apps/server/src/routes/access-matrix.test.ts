import { describe, expect, it } from "vitest";
import type { CampaignDetail, Exclusion, SiteDetail } from "@calmcrest/contracts";
import { createTestServer, SAME_ORIGIN, signedInAgent } from "../test-support";
import { postUpload, waitForUpload } from "./test-helpers";

// Every route against every role. `mine` is a campaign the demo engineer belongs to, `other` one they do not:
// outside one's access the answer is 404 with no data; a role that may not act answers 403.

type Role = "admin" | "lead" | "engineer" | "committee";
const ROLES: Role[] = ["admin", "lead", "engineer", "committee"];

const { app, context } = await createTestServer();
const agents = {
  admin: await signedInAgent(app, "admin"),
  lead: await signedInAgent(app, "lead"),
  engineer: await signedInAgent(app, "engineer"),
  committee: await signedInAgent(app, "committee"),
};
const { lead, admin } = agents;
const monitor = { apertureMm: 60, baselineMm: 200, wavelengthNm: 500 };
const site = (await lead.post("/api/sites").set(SAME_ORIGIN).send({ name: "Matrix Ridge", latitude: -25, longitude: -68, elevationM: 4000 })).body as SiteDetail;
const mine = (await lead.post(`/api/sites/${site.id}/campaigns`).set(SAME_ORIGIN).send({ name: "Mine", monitor })).body as CampaignDetail;
const other = (await lead.post(`/api/sites/${site.id}/campaigns`).set(SAME_ORIGIN).send({ name: "Other", monitor })).body as CampaignDetail;
const engineerId = (await context.db.knex("user").where({ email: "engineer@calmcrest.test" }).first<{ id: string }>()).id;
const committeeId = (await context.db.knex("user").where({ email: "committee@calmcrest.test" }).first<{ id: string }>()).id;
await admin.post(`/api/campaigns/${mine.id}/members`).set(SAME_ORIGIN).send({ userId: engineerId });

let fileCounter = 0;
/** A small readable log, different bytes each time (so no upload is a duplicate of another). */
function freshLog(): Buffer {
  fileCounter += 1;
  const minute = String(fileCounter % 60).padStart(2, "0");
  const hour = String(Math.floor(fileCounter / 60) % 24).padStart(2, "0");
  return Buffer.from(`time_utc,seeing_arcsec,zenith_deg\n2024-06-0${1 + (fileCounter % 9)}T${hour}:${minute}:00Z,0.8,20\n`);
}
const uploadIn = async (campaignId: number) => (await waitForUpload(lead, (await postUpload(lead, campaignId, freshLog())).body.upload.id)).id;
const mineUpload = await uploadIn(mine.id);
const otherUpload = await uploadIn(other.id);
const newExclusion = async (campaignId: number) =>
  ((await lead.post(`/api/campaigns/${campaignId}/exclusions`).set(SAME_ORIGIN).send({ from: "2020-01-01", to: "2020-01-02", reason: "test" })).body as Exclusion).id;

interface RouteCase {
  name: string;
  send: (role: Role) => Promise<{ status: number; body: unknown }>;
  expect: Record<Role, number>;
}

const as = (role: Role) => agents[role];
const cases: RouteCase[] = [
  { name: "GET /api/sites", send: (r) => as(r).get("/api/sites"), expect: { admin: 200, lead: 200, engineer: 200, committee: 403 } },
  {
    name: "POST /api/sites",
    send: (r) => as(r).post("/api/sites").set(SAME_ORIGIN).send({ name: `New ${r}`, latitude: 1, longitude: 2, elevationM: 3 }),
    expect: { admin: 201, lead: 201, engineer: 403, committee: 403 },
  },
  { name: "GET /api/sites/:id", send: (r) => as(r).get(`/api/sites/${site.id}`), expect: { admin: 200, lead: 200, engineer: 200, committee: 403 } },
  {
    name: "PATCH /api/sites/:id",
    send: (r) => as(r).patch(`/api/sites/${site.id}`).set(SAME_ORIGIN).send({ notes: `by ${r}` }),
    expect: { admin: 200, lead: 200, engineer: 403, committee: 403 },
  },
  { name: "GET /api/sites/:id/summary", send: (r) => as(r).get(`/api/sites/${site.id}/summary`), expect: { admin: 200, lead: 200, engineer: 200, committee: 403 } },
  { name: "GET /api/sites/:id/samples", send: (r) => as(r).get(`/api/sites/${site.id}/samples`), expect: { admin: 200, lead: 200, engineer: 200, committee: 403 } },
  {
    name: "POST /api/sites/:id/campaigns",
    send: (r) => as(r).post(`/api/sites/${site.id}/campaigns`).set(SAME_ORIGIN).send({ name: `By ${r}`, monitor }),
    expect: { admin: 201, lead: 201, engineer: 403, committee: 403 },
  },
  { name: "GET /api/campaigns/:id (member)", send: (r) => as(r).get(`/api/campaigns/${mine.id}`), expect: { admin: 200, lead: 200, engineer: 200, committee: 403 } },
  { name: "GET /api/campaigns/:id (not member)", send: (r) => as(r).get(`/api/campaigns/${other.id}`), expect: { admin: 200, lead: 200, engineer: 404, committee: 403 } },
  {
    name: "PATCH /api/campaigns/:id (member)",
    send: (r) => as(r).patch(`/api/campaigns/${mine.id}`).set(SAME_ORIGIN).send({ notes: r }),
    expect: { admin: 200, lead: 200, engineer: 403, committee: 403 },
  },
  {
    name: "PATCH /api/campaigns/:id (not member)",
    send: (r) => as(r).patch(`/api/campaigns/${other.id}`).set(SAME_ORIGIN).send({ notes: r }),
    expect: { admin: 200, lead: 200, engineer: 404, committee: 403 },
  },
  {
    name: "PUT /api/campaigns/:id/saved-mapping (member)",
    send: (r) => as(r).put(`/api/campaigns/${mine.id}/saved-mapping`).set(SAME_ORIGIN).send({ mapping: { time_utc: "t" } }),
    expect: { admin: 403, lead: 200, engineer: 200, committee: 403 },
  },
  {
    name: "PUT /api/campaigns/:id/saved-mapping (not member)",
    send: (r) => as(r).put(`/api/campaigns/${other.id}/saved-mapping`).set(SAME_ORIGIN).send({ mapping: { time_utc: "t" } }),
    expect: { admin: 403, lead: 200, engineer: 404, committee: 403 },
  },
  {
    name: "POST /api/campaigns/:id/exclusions (member)",
    send: (r) => as(r).post(`/api/campaigns/${mine.id}/exclusions`).set(SAME_ORIGIN).send({ from: "2020-01-01", to: "2020-01-02", reason: r }),
    expect: { admin: 403, lead: 201, engineer: 201, committee: 403 },
  },
  {
    name: "POST /api/campaigns/:id/exclusions (not member)",
    send: (r) => as(r).post(`/api/campaigns/${other.id}/exclusions`).set(SAME_ORIGIN).send({ from: "2020-01-01", to: "2020-01-02", reason: r }),
    expect: { admin: 403, lead: 201, engineer: 404, committee: 403 },
  },
  {
    name: "DELETE /api/campaigns/:id/exclusions/:exclusionId (member)",
    send: async (r) => as(r).delete(`/api/campaigns/${mine.id}/exclusions/${await newExclusion(mine.id)}`).set(SAME_ORIGIN),
    expect: { admin: 403, lead: 204, engineer: 204, committee: 403 },
  },
  {
    name: "DELETE /api/campaigns/:id/exclusions/:exclusionId (not member)",
    send: async (r) => as(r).delete(`/api/campaigns/${other.id}/exclusions/${await newExclusion(other.id)}`).set(SAME_ORIGIN),
    expect: { admin: 403, lead: 204, engineer: 404, committee: 403 },
  },
  {
    name: "POST /api/campaigns/:id/members",
    send: (r) => as(r).post(`/api/campaigns/${other.id}/members`).set(SAME_ORIGIN).send({ userId: committeeId }),
    expect: { admin: 201, lead: 403, engineer: 404, committee: 403 },
  },
  {
    name: "DELETE /api/campaigns/:id/members/:userId",
    send: async (r) => {
      await admin.post(`/api/campaigns/${mine.id}/members`).set(SAME_ORIGIN).send({ userId: committeeId });
      return as(r).delete(`/api/campaigns/${mine.id}/members/${committeeId}`).set(SAME_ORIGIN);
    },
    expect: { admin: 204, lead: 403, engineer: 403, committee: 403 },
  },
  { name: "GET /api/campaigns/:id/summary (member)", send: (r) => as(r).get(`/api/campaigns/${mine.id}/summary`), expect: { admin: 200, lead: 200, engineer: 200, committee: 403 } },
  {
    name: "GET /api/campaigns/:id/summary (not member)",
    send: (r) => as(r).get(`/api/campaigns/${other.id}/summary`),
    expect: { admin: 200, lead: 200, engineer: 404, committee: 403 },
  },
  {
    name: "GET /api/campaigns/:id/samples (not member)",
    send: (r) => as(r).get(`/api/campaigns/${other.id}/samples`),
    expect: { admin: 200, lead: 200, engineer: 404, committee: 403 },
  },
  {
    name: "POST /api/campaigns/:id/uploads/preview (member)",
    send: (r) => as(r).post(`/api/campaigns/${mine.id}/uploads/preview`).set(SAME_ORIGIN).attach("file", freshLog(), "head.csv"),
    expect: { admin: 403, lead: 200, engineer: 200, committee: 403 },
  },
  {
    name: "POST /api/campaigns/:id/uploads/preview (not member)",
    send: (r) => as(r).post(`/api/campaigns/${other.id}/uploads/preview`).set(SAME_ORIGIN).attach("file", freshLog(), "head.csv"),
    expect: { admin: 403, lead: 200, engineer: 404, committee: 403 },
  },
  { name: "POST /api/campaigns/:id/uploads (member)", send: (r) => postUpload(as(r), mine.id, freshLog()), expect: { admin: 403, lead: 202, engineer: 202, committee: 403 } },
  { name: "POST /api/campaigns/:id/uploads (not member)", send: (r) => postUpload(as(r), other.id, freshLog()), expect: { admin: 403, lead: 202, engineer: 404, committee: 403 } },
  { name: "GET /api/uploads/:id (member)", send: (r) => as(r).get(`/api/uploads/${mineUpload}`), expect: { admin: 200, lead: 200, engineer: 200, committee: 403 } },
  { name: "GET /api/uploads/:id (not member)", send: (r) => as(r).get(`/api/uploads/${otherUpload}`), expect: { admin: 200, lead: 200, engineer: 404, committee: 403 } },
  {
    name: "GET /api/uploads/:id/rejected.csv (not member)",
    send: (r) => as(r).get(`/api/uploads/${otherUpload}/rejected.csv`),
    expect: { admin: 200, lead: 200, engineer: 404, committee: 403 },
  },
  {
    // A done upload cannot be retried (409), but only roles that may upload get that far.
    name: "POST /api/uploads/:id/retry",
    send: (r) => as(r).post(`/api/uploads/${mineUpload}/retry`).set(SAME_ORIGIN),
    expect: { admin: 403, lead: 409, engineer: 409, committee: 403 },
  },
  { name: "POST /api/uploads/:id/retry (not member)", send: (r) => as(r).post(`/api/uploads/${otherUpload}/retry`).set(SAME_ORIGIN), expect: { admin: 403, lead: 409, engineer: 404, committee: 403 } },
  { name: "GET /api/users", send: (r) => as(r).get("/api/users"), expect: { admin: 200, lead: 403, engineer: 403, committee: 403 } },
  {
    name: "POST /api/users",
    send: (r) => as(r).post("/api/users").set(SAME_ORIGIN).send({ email: `made-by-${r}@calmcrest.test`, name: "Made", role: "engineer", password: "a-long-password" }),
    expect: { admin: 201, lead: 403, engineer: 403, committee: 403 },
  },
  {
    name: "PATCH /api/users/:id",
    send: (r) => as(r).patch(`/api/users/${committeeId}`).set(SAME_ORIGIN).send({ role: "committee" }),
    expect: { admin: 200, lead: 403, engineer: 403, committee: 403 },
  },
];

describe("access to every route by role", () => {
  for (const routeCase of cases) {
    it(`${routeCase.name} answers ${ROLES.map((role) => `${role} ${routeCase.expect[role]}`).join(", ")}`, async () => {
      const seen: Record<string, number> = {};
      for (const role of ROLES) {
        const response = await routeCase.send(role);
        seen[role] = response.status;
        // A 404 for an inaccessible item carries no data, only the error.
        if (response.status === 404) expect(Object.keys(response.body as object)).toEqual(["error"]);
      }
      expect(seen).toEqual(routeCase.expect);
    });
  }
  it("waits for the uploads it started", async () => {
    await context.ingest.idle();
    const states = await context.db.knex("upload").distinct("status");
    expect(states).toEqual([{ status: "done" }]);
  });
});
