import request from "supertest";
import { describe, expect, it } from "vitest";
import type { CampaignDetail, Exclusion, ReportDetail, SiteDetail } from "@calmcrest/contracts";
import { roleAllows } from "../access/access.server";
import type { RouteTableEntry } from "../http/route-table";
import { createAccount, createTestServer, SAME_ORIGIN, signedInAgent, tableRows, userIdOf } from "../test-support";
import { routeTable } from "./index";
import { postUpload, waitForUpload } from "./test-helpers";

// Every route of the server's route table against every role and without a session. The expected statuses come
// from the table: no session 401 (public routes excepted), a role the route's guard does not list 403, and for a
// route on one campaign, not visible to the caller 404 (with no data) before the role's action check (403). A case
// below only says how to call the route and what a caller who may call it gets. `mine` is a campaign the demo
// engineer belongs to, `other` one they do not. A route in the table without a case here fails the test.

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
const engineerId = await userIdOf(context, "engineer@calmcrest.test");
const committeeId = await userIdOf(context, "committee@calmcrest.test");
await admin.post(`/api/campaigns/${mine.id}/members`).set(SAME_ORIGIN).send({ userId: engineerId });
// A second site with a campaign of the engineer's, so every field role has two sites to compare.
const secondSite = (await lead.post("/api/sites").set(SAME_ORIGIN).send({ name: "Matrix Spur", latitude: -25.1, longitude: -68.2, elevationM: 3900 })).body as SiteDetail;
const secondMine = (await lead.post(`/api/sites/${secondSite.id}/campaigns`).set(SAME_ORIGIN).send({ name: "Mine too", monitor })).body as CampaignDetail;
await admin.post(`/api/campaigns/${secondMine.id}/members`).set(SAME_ORIGIN).send({ userId: engineerId });
/** An account the account routes act on, so the demo agents keep their roles and sessions. */
const spare = { id: await createAccount(context, { email: "spare@calmcrest.test", name: "Spare Person", role: "committee", password: "quartz-meadow-falcon-3" }) };
let spareRole: "committee" | "lead" = "committee";

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

// A report on two sites, published once so committee members (shared with all by default) can read it.
const site2 = (await lead.post("/api/sites").set(SAME_ORIGIN).send({ name: "Matrix Spur", latitude: -25.1, longitude: -68.1, elevationM: 3900 })).body as SiteDetail;
const reportComparison = { sites: `${site.id},${site2.id}` };
const report = (await lead.post("/api/reports").set(SAME_ORIGIN).send({ title: "Matrix report", comparison: reportComparison })).body as ReportDetail;
await lead.post(`/api/reports/${report.id}/versions`).set(SAME_ORIGIN).send({});
const firstSectionId = report.draft?.sections[0]?.id ?? 0;
const newSection = async () => {
  const detail = (await lead.post(`/api/reports/${report.id}/sections`).set(SAME_ORIGIN).send({ title: "Extra" })).body as ReportDetail;
  return detail.draft?.sections.at(-1)?.id ?? 0;
};
const sectionOrder = async () => ((await lead.get(`/api/reports/${report.id}`)).body as ReportDetail).draft?.sections.map((section) => section.id) ?? [];
/** A comment written by `role` (by the lead for callers who cannot comment), for that caller to withdraw. */
const ownComment = async (role: Role | null) => {
  const author = role === null || role === "engineer" ? lead : agents[role];
  return (await author.post(`/api/reports/${report.id}/comments`).set(SAME_ORIGIN).send({ body: "matrix", version: 1 })).body.id as number;
};

interface RouteCase {
  /** "METHOD path" exactly as in the route table. */
  route: string;
  /** Which campaign the call is about, when the route is on one: the engineer sees only `mine`. */
  campaign?: "mine" | "other";
  send: (role: Role | null) => Promise<{ status: number; body: unknown }>;
  /** The status for a caller the route's guard and the campaign's access let through. */
  ok: number;
}

const anonymous = request.agent(app);
const as = (role: Role | null) => (role === null ? anonymous : agents[role]);
const cases: RouteCase[] = [
  { route: "GET /api/health", send: (r) => as(r).get("/api/health"), ok: 200 },
  { route: "GET /api/config", send: (r) => as(r).get("/api/config"), ok: 200 },
  {
    // A wrong password: a successful sign-in would replace the agent's session.
    route: "POST /api/auth/sign-in",
    // An e-mail no agent uses: five failures put it under the sign-in limit.
    send: (r) => as(r).post("/api/auth/sign-in").set(SAME_ORIGIN).send({ email: "matrix-nobody@calmcrest.test", password: "not-the-password" }),
    ok: 401,
  },
  {
    // Signs out a session of its own, not the agent's.
    route: "POST /api/auth/sign-out",
    send: async (r) => (r === null ? anonymous : await signedInAgent(app, r)).post("/api/auth/sign-out").set(SAME_ORIGIN),
    ok: 200,
  },
  { route: "GET /api/me", send: (r) => as(r).get("/api/me"), ok: 200 },
  { route: "GET /api/sites", send: (r) => as(r).get("/api/sites"), ok: 200 },
  { route: "GET /api/campaigns", send: (r) => as(r).get("/api/campaigns"), ok: 200 },
  { route: "POST /api/sites", send: (r) => as(r).post("/api/sites").set(SAME_ORIGIN).send({ name: `New ${r}`, latitude: 1, longitude: 2, elevationM: 3 }), ok: 201 },
  { route: "GET /api/sites/:id", send: (r) => as(r).get(`/api/sites/${site.id}`), ok: 200 },
  { route: "PATCH /api/sites/:id", send: (r) => as(r).patch(`/api/sites/${site.id}`).set(SAME_ORIGIN).send({ notes: `by ${r}` }), ok: 200 },
  { route: "GET /api/sites/:id/summary", send: (r) => as(r).get(`/api/sites/${site.id}/summary`), ok: 200 },
  { route: "GET /api/sites/:id/samples", send: (r) => as(r).get(`/api/sites/${site.id}/samples`), ok: 200 },
  { route: "GET /api/comparisons", send: (r) => as(r).get(`/api/comparisons?sites=${site.id},${secondSite.id}`), ok: 200 },
  { route: "POST /api/sites/:id/campaigns", send: (r) => as(r).post(`/api/sites/${site.id}/campaigns`).set(SAME_ORIGIN).send({ name: `By ${r}`, monitor }), ok: 201 },
  { route: "GET /api/campaigns/:id", campaign: "mine", send: (r) => as(r).get(`/api/campaigns/${mine.id}`), ok: 200 },
  { route: "GET /api/campaigns/:id", campaign: "other", send: (r) => as(r).get(`/api/campaigns/${other.id}`), ok: 200 },
  { route: "PATCH /api/campaigns/:id", campaign: "mine", send: (r) => as(r).patch(`/api/campaigns/${mine.id}`).set(SAME_ORIGIN).send({ notes: String(r) }), ok: 200 },
  { route: "PATCH /api/campaigns/:id", campaign: "other", send: (r) => as(r).patch(`/api/campaigns/${other.id}`).set(SAME_ORIGIN).send({ notes: String(r) }), ok: 200 },
  {
    route: "PUT /api/campaigns/:id/saved-mapping",
    campaign: "mine",
    send: (r) => as(r).put(`/api/campaigns/${mine.id}/saved-mapping`).set(SAME_ORIGIN).send({ mapping: { time_utc: "t" } }),
    ok: 200,
  },
  {
    route: "PUT /api/campaigns/:id/saved-mapping",
    campaign: "other",
    send: (r) => as(r).put(`/api/campaigns/${other.id}/saved-mapping`).set(SAME_ORIGIN).send({ mapping: { time_utc: "t" } }),
    ok: 200,
  },
  {
    route: "POST /api/campaigns/:id/exclusions",
    campaign: "mine",
    send: (r) => as(r).post(`/api/campaigns/${mine.id}/exclusions`).set(SAME_ORIGIN).send({ from: "2020-01-01", to: "2020-01-02", reason: String(r) }),
    ok: 201,
  },
  {
    route: "POST /api/campaigns/:id/exclusions",
    campaign: "other",
    send: (r) => as(r).post(`/api/campaigns/${other.id}/exclusions`).set(SAME_ORIGIN).send({ from: "2020-01-01", to: "2020-01-02", reason: String(r) }),
    ok: 201,
  },
  {
    route: "DELETE /api/campaigns/:id/exclusions/:exclusionId",
    campaign: "mine",
    send: async (r) => as(r).delete(`/api/campaigns/${mine.id}/exclusions/${await newExclusion(mine.id)}`).set(SAME_ORIGIN),
    ok: 204,
  },
  {
    route: "DELETE /api/campaigns/:id/exclusions/:exclusionId",
    campaign: "other",
    send: async (r) => as(r).delete(`/api/campaigns/${other.id}/exclusions/${await newExclusion(other.id)}`).set(SAME_ORIGIN),
    ok: 204,
  },
  {
    route: "POST /api/campaigns/:id/members",
    campaign: "other",
    send: (r) => as(r).post(`/api/campaigns/${other.id}/members`).set(SAME_ORIGIN).send({ userId: committeeId }),
    ok: 201,
  },
  {
    route: "DELETE /api/campaigns/:id/members/:userId",
    campaign: "mine",
    send: async (r) => {
      await admin.post(`/api/campaigns/${mine.id}/members`).set(SAME_ORIGIN).send({ userId: committeeId });
      return as(r).delete(`/api/campaigns/${mine.id}/members/${committeeId}`).set(SAME_ORIGIN);
    },
    ok: 204,
  },
  { route: "GET /api/campaigns/:id/summary", campaign: "mine", send: (r) => as(r).get(`/api/campaigns/${mine.id}/summary`), ok: 200 },
  { route: "GET /api/campaigns/:id/summary", campaign: "other", send: (r) => as(r).get(`/api/campaigns/${other.id}/summary`), ok: 200 },
  { route: "GET /api/campaigns/:id/samples", campaign: "other", send: (r) => as(r).get(`/api/campaigns/${other.id}/samples`), ok: 200 },
  {
    route: "POST /api/campaigns/:id/uploads/preview",
    campaign: "mine",
    send: (r) => as(r).post(`/api/campaigns/${mine.id}/uploads/preview`).set(SAME_ORIGIN).attach("file", freshLog(), "head.csv"),
    ok: 200,
  },
  {
    route: "POST /api/campaigns/:id/uploads/preview",
    campaign: "other",
    send: (r) => as(r).post(`/api/campaigns/${other.id}/uploads/preview`).set(SAME_ORIGIN).attach("file", freshLog(), "head.csv"),
    ok: 200,
  },
  {
    route: "POST /api/campaigns/:id/uploads/check",
    campaign: "mine",
    send: (r) => as(r).post(`/api/campaigns/${mine.id}/uploads/check`).set(SAME_ORIGIN).attach("file", freshLog(), "whole.csv"),
    ok: 200,
  },
  {
    route: "POST /api/campaigns/:id/uploads/check",
    campaign: "other",
    send: (r) => as(r).post(`/api/campaigns/${other.id}/uploads/check`).set(SAME_ORIGIN).attach("file", freshLog(), "whole.csv"),
    ok: 200,
  },
  { route: "POST /api/campaigns/:id/uploads", campaign: "mine", send: (r) => postUpload(as(r), mine.id, freshLog()), ok: 202 },
  { route: "POST /api/campaigns/:id/uploads", campaign: "other", send: (r) => postUpload(as(r), other.id, freshLog()), ok: 202 },
  { route: "GET /api/uploads/:id", campaign: "mine", send: (r) => as(r).get(`/api/uploads/${mineUpload}`), ok: 200 },
  { route: "GET /api/uploads/:id", campaign: "other", send: (r) => as(r).get(`/api/uploads/${otherUpload}`), ok: 200 },
  { route: "GET /api/uploads/:id/rejected.csv", campaign: "other", send: (r) => as(r).get(`/api/uploads/${otherUpload}/rejected.csv`), ok: 200 },
  // A done upload cannot be retried (409), but only roles that may upload there get that far.
  { route: "POST /api/uploads/:id/retry", campaign: "mine", send: (r) => as(r).post(`/api/uploads/${mineUpload}/retry`).set(SAME_ORIGIN), ok: 409 },
  { route: "POST /api/uploads/:id/retry", campaign: "other", send: (r) => as(r).post(`/api/uploads/${otherUpload}/retry`).set(SAME_ORIGIN), ok: 409 },
  { route: "GET /api/uploads/:id/raw", campaign: "mine", send: (r) => as(r).get(`/api/uploads/${mineUpload}/raw`), ok: 200 },
  { route: "GET /api/uploads/:id/raw", campaign: "other", send: (r) => as(r).get(`/api/uploads/${otherUpload}/raw`), ok: 200 },
  // Withdraw, restore and re-read: a lead, or the engineer who sent the file. Each caller acts on an upload of its
  // own where it may upload (a fresh one each time), else on the lead's.
  ...(["mine", "other"] as const).flatMap((which): RouteCase[] => {
    const campaignId = () => (which === "mine" ? mine.id : other.id);
    const uploadFor = async (r: Role | null) => {
      if (r === "lead" || (r === "engineer" && which === "mine")) {
        const agent = agents[r];
        return (await waitForUpload(agent, (await postUpload(agent, campaignId(), freshLog())).body.upload.id)).id;
      }
      return which === "mine" ? mineUpload : otherUpload;
    };
    const withdrawnFor = async (r: Role | null) => {
      const id = await uploadFor(r);
      if (r === "lead" || (r === "engineer" && which === "mine")) await agents[r].post(`/api/uploads/${id}/withdraw`).set(SAME_ORIGIN).send({ reason: "matrix" });
      return id;
    };
    return [
      { route: "POST /api/uploads/:id/withdraw", campaign: which, send: async (r) => as(r).post(`/api/uploads/${await uploadFor(r)}/withdraw`).set(SAME_ORIGIN).send({ reason: "matrix" }), ok: 200 },
      { route: "POST /api/uploads/:id/restore", campaign: which, send: async (r) => as(r).post(`/api/uploads/${await withdrawnFor(r)}/restore`).set(SAME_ORIGIN).send({}), ok: 200 },
      {
        route: "POST /api/uploads/:id/reread",
        campaign: which,
        send: async (r) => as(r).post(`/api/uploads/${await uploadFor(r)}/reread`).set(SAME_ORIGIN).send({ mapping: { time_utc: "time_utc", seeing_arcsec: "seeing_arcsec", zenith_deg: "zenith_deg" }, reason: "matrix" }),
        ok: 202,
      },
    ];
  }),
  { route: "GET /api/users", send: (r) => as(r).get("/api/users"), ok: 200 },
  {
    route: "POST /api/users/invitations",
    send: (r) => as(r).post("/api/users/invitations").set(SAME_ORIGIN).send({ email: `invited-by-${r ?? "nobody"}@calmcrest.test`, name: "Invited", role: "engineer", campaignIds: [mine.id] }),
    ok: 201,
  },
  { route: "POST /api/users/:id/password-link", send: (r) => as(r).post(`/api/users/${spare.id}/password-link`).set(SAME_ORIGIN), ok: 200 },
  {
    // Public, with the same answer for any address.
    route: "POST /api/auth/password-reset",
    send: (r) => as(r).post("/api/auth/password-reset").set(SAME_ORIGIN).send({ email: `reset-${r ?? "nobody"}@calmcrest.test` }),
    ok: 202,
  },
  // An unknown link is a 404 for everyone (the link is the credential, so no session is needed).
  { route: "GET /api/auth/password-links/:token", send: (r) => as(r).get(`/api/auth/password-links/not-a-link-${r ?? "x"}`), ok: 404 },
  {
    route: "POST /api/auth/password-links/:token",
    send: (r) => as(r).post(`/api/auth/password-links/not-a-link-${r ?? "x"}`).set(SAME_ORIGIN).send({ password: "quartz-meadow-falcon-3" }),
    ok: 404,
  },
  { route: "GET /api/outbox", send: (r) => as(r).get("/api/outbox"), ok: 200 },
  { route: "GET /api/reports", send: (r) => as(r).get("/api/reports"), ok: 200 },
  { route: "POST /api/reports", send: (r) => as(r).post("/api/reports").set(SAME_ORIGIN).send({ title: `By ${r}`, comparison: reportComparison }), ok: 201 },
  { route: "GET /api/reports/recipients", send: (r) => as(r).get("/api/reports/recipients"), ok: 200 },
  { route: "GET /api/reports/:id", send: (r) => as(r).get(`/api/reports/${report.id}`), ok: 200 },
  { route: "PATCH /api/reports/:id", send: (r) => as(r).patch(`/api/reports/${report.id}`).set(SAME_ORIGIN).send({ summary: `by ${r}` }), ok: 200 },
  { route: "GET /api/reports/:id/preview", send: (r) => as(r).get(`/api/reports/${report.id}/preview`), ok: 200 },
  { route: "POST /api/reports/:id/sections", send: (r) => as(r).post(`/api/reports/${report.id}/sections`).set(SAME_ORIGIN).send({ title: `By ${r}` }), ok: 201 },
  { route: "PUT /api/reports/:id/sections/order", send: async (r) => as(r).put(`/api/reports/${report.id}/sections/order`).set(SAME_ORIGIN).send({ sectionIds: await sectionOrder() }), ok: 200 },
  { route: "PATCH /api/reports/:id/sections/:sectionId", send: (r) => as(r).patch(`/api/reports/${report.id}/sections/${firstSectionId}`).set(SAME_ORIGIN).send({ body: `by ${r}` }), ok: 200 },
  { route: "DELETE /api/reports/:id/sections/:sectionId", send: async (r) => as(r).delete(`/api/reports/${report.id}/sections/${await newSection()}`).set(SAME_ORIGIN), ok: 200 },
  { route: "GET /api/reports/:id/versions/:version", send: (r) => as(r).get(`/api/reports/${report.id}/versions/1`), ok: 200 },
  { route: "POST /api/reports/:id/versions", send: (r) => as(r).post(`/api/reports/${report.id}/versions`).set(SAME_ORIGIN).send({}), ok: 201 },
  { route: "GET /api/reports/:id/comments", send: (r) => as(r).get(`/api/reports/${report.id}/comments`), ok: 200 },
  { route: "POST /api/reports/:id/comments", send: (r) => as(r).post(`/api/reports/${report.id}/comments`).set(SAME_ORIGIN).send({ body: `by ${r}`, version: 1 }), ok: 201 },
  { route: "PATCH /api/comments/:id", send: async (r) => as(r).patch(`/api/comments/${await ownComment(r)}`).set(SAME_ORIGIN).send({ action: "withdraw" }), ok: 200 },
  { route: "GET /api/me/preferences", send: (r) => as(r).get("/api/me/preferences"), ok: 200 },
  { route: "PATCH /api/me/preferences", send: (r) => as(r).patch("/api/me/preferences").set(SAME_ORIGIN).send({ commentEmails: true }), ok: 200 },
  {
    route: "PATCH /api/users/:id",
    send: async (r) => {
      const response = await as(r).patch(`/api/users/${spare.id}`).set(SAME_ORIGIN).send({ role: spareRole === "committee" ? "lead" : "committee" });
      if (response.status === 200) spareRole = spareRole === "committee" ? "lead" : "committee";
      return response;
    },
    ok: 200,
  },
  { route: "GET /api/users/:id", send: (r) => as(r).get(`/api/users/${spare.id}`), ok: 200 },
  {
    route: "POST /api/users/:id/email",
    send: (r) => as(r).post(`/api/users/${spare.id}/email`).set(SAME_ORIGIN).send({ email: `spare-${r ?? "nobody"}@calmcrest.test` }),
    ok: 200,
  },
  {
    route: "POST /api/users/:id/deactivate",
    send: async (r) => {
      const response = await as(r).post(`/api/users/${spare.id}/deactivate`).set(SAME_ORIGIN);
      // Back to active for the next case.
      if (response.status === 200) await admin.post(`/api/users/${spare.id}/reactivate`).set(SAME_ORIGIN);
      return response;
    },
    ok: 200,
  },
  {
    route: "POST /api/users/:id/reactivate",
    send: async (r) => {
      await admin.post(`/api/users/${spare.id}/deactivate`).set(SAME_ORIGIN);
      const response = await as(r).post(`/api/users/${spare.id}/reactivate`).set(SAME_ORIGIN);
      if (response.status !== 200) await admin.post(`/api/users/${spare.id}/reactivate`).set(SAME_ORIGIN);
      return response;
    },
    ok: 200,
  },
  { route: "POST /api/users/:id/sign-out-everywhere", send: (r) => as(r).post(`/api/users/${spare.id}/sign-out-everywhere`).set(SAME_ORIGIN), ok: 200 },
  {
    // Signs out every session of a throwaway sign-in of that role, not the agent's (which later cases still use).
    route: "POST /api/auth/sign-out-everywhere",
    send: async (r) => {
      if (r === null) return anonymous.post("/api/auth/sign-out-everywhere").set(SAME_ORIGIN);
      const email = await makeThrowaway(r);
      const agent = request.agent(app);
      await agent.post("/api/auth/sign-in").set(SAME_ORIGIN).send({ email, password: "quartz-meadow-falcon-3" });
      return agent.post("/api/auth/sign-out-everywhere").set(SAME_ORIGIN);
    },
    ok: 200,
  },
  { route: "GET /api/audit", send: (r) => as(r).get("/api/audit?pageSize=5"), ok: 200 },
  { route: "GET /api/audit/export.csv", send: (r) => as(r).get("/api/audit/export.csv?action=user.role"), ok: 200 },
];

let throwaways = 0;
/** A fresh account of that role (its own sessions only). */
async function makeThrowaway(role: Role): Promise<string> {
  throwaways += 1;
  const email = `throwaway-${throwaways}@calmcrest.test`;
  await createAccount(context, { email, name: `Throwaway ${throwaways}`, role, password: "quartz-meadow-falcon-3" });
  return email;
}

const table = routeTable(context);
const entryOf = (routeCase: RouteCase): RouteTableEntry | undefined => table.find((entry) => `${entry.method} ${entry.path}` === routeCase.route);

/** What the route table says `role` (null: no session) gets from the case's route. */
function expectedStatus(entry: RouteTableEntry, routeCase: RouteCase, role: Role | null): number {
  if (entry.roles === null) return routeCase.ok;
  if (role === null) return 401;
  if (!entry.roles.includes(role)) return 403;
  if (entry.campaignAction) {
    if (role === "engineer" && routeCase.campaign === "other") return 404;
    if (!roleAllows(role, entry.campaignAction)) return 403;
  }
  return routeCase.ok;
}

describe("the route table", () => {
  it("has a case in this matrix for every route, and every case names a route in the table", () => {
    const covered = new Set(cases.map((routeCase) => routeCase.route));
    expect(table.map((entry) => `${entry.method} ${entry.path}`).filter((route) => !covered.has(route))).toEqual([]);
    expect(cases.filter((routeCase) => !entryOf(routeCase)).map((routeCase) => routeCase.route)).toEqual([]);
  });

  it("declares, for every route on one campaign, the campaign action it checks", () => {
    const onCampaign = table.filter((entry) => /^\/api\/(campaigns\/:id|uploads\/:id)/.test(entry.path));
    expect(onCampaign.filter((entry) => !entry.campaignAction).map((entry) => `${entry.method} ${entry.path}`)).toEqual([]);
  });
});

describe("access to every route by role", () => {
  for (const routeCase of cases) {
    const entry = entryOf(routeCase);
    if (!entry) continue;
    const callers: (Role | null)[] = [...ROLES, null];
    const expected = Object.fromEntries(callers.map((role) => [role ?? "no session", expectedStatus(entry, routeCase, role)]));
    const name = `${routeCase.route}${routeCase.campaign ? ` (${routeCase.campaign === "mine" ? "member" : "not member"})` : ""}`;
    it(`${name} answers ${Object.entries(expected).map(([caller, status]) => `${caller} ${status}`).join(", ")}`, async () => {
      const seen: Record<string, number> = {};
      for (const role of callers) {
        const response = await routeCase.send(role);
        seen[role ?? "no session"] = response.status;
        // A 404 for an inaccessible item carries no data, only the error.
        if (response.status === 404) expect(Object.keys(response.body as object)).toEqual(["error"]);
      }
      expect(seen).toEqual(expected);
    });
  }
  it("waits for the uploads it started", async () => {
    await context.ingest.idle();
    const states = [...new Set((await tableRows(context, "upload")).map((row) => row.status))].map((status) => ({ status }));
    expect(states).toEqual([{ status: "done" }]);
  });
});
