import request from "supertest";
import { describe, expect, it } from "vitest";
import { createApp } from "../app";
import { ApiRouter } from "../http/route-table";
import { DEMO_PASSWORD_FOR_TESTS, SAME_ORIGIN, createTestServer, signedInAgent, tableRows } from "../test-support";

const { app, context } = await createTestServer();

describe("health", () => {
  it("answers ok without a session", async () => {
    const response = await request(app).get("/api/health");
    expect(response.status).toBe(200);
    expect(response.body).toEqual({ ok: true });
  });
});

describe("sign-in", () => {
  it("sets an HttpOnly, SameSite=Lax session cookie and returns the user", async () => {
    const response = await request(app)
      .post("/api/auth/sign-in")
      .set(SAME_ORIGIN)
      .send({ email: "Lead@Calmcrest.test", password: DEMO_PASSWORD_FOR_TESTS });
    expect(response.status).toBe(200);
    expect(response.body).toMatchObject({ email: "lead@calmcrest.test", role: "lead", name: expect.any(String) });
    const cookie = String(response.headers["set-cookie"]);
    expect(cookie).toMatch(/calmcrest_session=[^;]+/);
    expect(cookie).toMatch(/HttpOnly/i);
    expect(cookie).toMatch(/SameSite=Lax/i);
    // Not Secure outside production, so it works over plain http on localhost.
    expect(cookie).not.toMatch(/Secure/);
  });

  it("answers 401 with the same message for a wrong password and an unknown account", async () => {
    const wrongPassword = await request(app).post("/api/auth/sign-in").set(SAME_ORIGIN).send({ email: "lead@calmcrest.test", password: "nope-nope" });
    const unknown = await request(app).post("/api/auth/sign-in").set(SAME_ORIGIN).send({ email: "nobody@calmcrest.test", password: "nope-nope" });
    expect(wrongPassword.status).toBe(401);
    expect(unknown.status).toBe(401);
    expect(wrongPassword.body.error.code).toBe("bad_credentials");
    expect(wrongPassword.body.error.message).toBe(unknown.body.error.message);
    expect(wrongPassword.headers["set-cookie"]).toBeUndefined();
  });

  it("answers 400 naming the fields when the body is not a sign-in form", async () => {
    const response = await request(app).post("/api/auth/sign-in").set(SAME_ORIGIN).send({ email: "not-an-email" });
    expect(response.status).toBe(400);
    expect(response.body.error.code).toBe("invalid_input");
    expect(Object.keys(response.body.error.fields)).toEqual(expect.arrayContaining(["email", "password"]));
  });

  it("answers 400 for a body that is not JSON", async () => {
    const response = await request(app).post("/api/auth/sign-in").set(SAME_ORIGIN).set("Content-Type", "application/json").send("{oops");
    expect(response.status).toBe(400);
    expect(response.body.error.code).toBe("malformed_body");
  });
});

describe("the Origin check", () => {
  it("rejects a state-changing request from another site", async () => {
    const response = await request(app)
      .post("/api/auth/sign-in")
      .set({ Origin: "https://elsewhere.example", Host: "calmcrest.test" })
      .send({ email: "lead@calmcrest.test", password: DEMO_PASSWORD_FOR_TESTS });
    expect(response.status).toBe(403);
    expect(response.body.error.code).toBe("bad_origin");
  });

  it("rejects a state-changing request with no Origin header", async () => {
    const response = await request(app).post("/api/auth/sign-out").send({});
    expect(response.status).toBe(403);
    expect(response.body.error.code).toBe("bad_origin");
  });

  it("lets reads through without an Origin header", async () => {
    const response = await request(app).get("/api/health");
    expect(response.status).toBe(200);
  });
});

describe("/api/me and sign-out", () => {
  it("answers 401 JSON without a session", async () => {
    const response = await request(app).get("/api/me");
    expect(response.status).toBe(401);
    expect(response.body).toEqual({ error: { code: "signed_out", message: expect.stringMatching(/sign in/i) } });
  });

  it("returns the signed-in user, then 401 after sign-out", async () => {
    const agent = await signedInAgent(app, "engineer");
    const me = await agent.get("/api/me");
    expect(me.status).toBe(200);
    expect(me.body).toEqual({ id: expect.any(String), email: "engineer@calmcrest.test", name: expect.any(String), role: "engineer" });

    const signOut = await agent.post("/api/auth/sign-out").set(SAME_ORIGIN);
    expect(signOut.status).toBe(200);
    const after = await agent.get("/api/me");
    expect(after.status).toBe(401);
  });

  it("a stale session cookie gets 401 and a blanking cookie", async () => {
    const response = await request(app).get("/api/me").set("Cookie", "calmcrest_session=not-a-real-session");
    expect(response.status).toBe(401);
    expect(String(response.headers["set-cookie"])).toMatch(/calmcrest_session=;/);
  });
});

describe("roles", () => {
  // A probe router mounted on a second app built from the same context, so the role guard is tested as routes declare it.
  const probe = new ApiRouter("/probe");
  probe.route("GET", "/lead-only", { access: ["lead", "admin"] }, (_req, res) => {
    res.json({ ok: true });
  });

  it("answers 403 JSON for a role that may not use a route, 200 for one that may", async () => {
    const { apiRouteModules } = await import("./index");
    apiRouteModules.push(() => probe);
    try {
      const probeApp = createApp(context);
      const committee = await signedInAgent(probeApp, "committee");
      const denied = await committee.get("/api/probe/lead-only");
      expect(denied.status).toBe(403);
      expect(denied.body.error.code).toBe("forbidden");
      const lead = await signedInAgent(probeApp, "lead");
      expect((await lead.get("/api/probe/lead-only")).status).toBe(200);
    } finally {
      apiRouteModules.pop();
    }
  });

  it("answers 404 JSON for an unknown API route", async () => {
    const response = await request(app).get("/api/no-such-thing");
    expect(response.status).toBe(404);
    expect(response.body.error.code).toBe("not_found");
  });
});

describe("seeding", () => {
  it("creates one demo user per role", async () => {
    const rows = (await tableRows(context, "user")).map(({ email, role }) => ({ email, role })).sort((left, right) => String(left.email).localeCompare(String(right.email)));
    expect(rows).toEqual([
      { email: "admin@calmcrest.test", role: "admin" },
      { email: "committee@calmcrest.test", role: "committee" },
      { email: "engineer@calmcrest.test", role: "engineer" },
      { email: "lead@calmcrest.test", role: "lead" },
    ]);
  });
});

describe("/api/config", () => {
  it("reports no online map tiles unless the deployment configures them", async () => {
    const response = await request(app).get("/api/config");
    expect(response.status).toBe(200);
    expect(response.body).toEqual({ mapTiles: null });
  });

  it("hands out the configured tile server", async () => {
    const { app: tiledApp } = await createTestServer({
      seed: "none",
      env: { CALMCREST_TILE_URL: "https://tiles.example.org/{z}/{x}/{y}.png", CALMCREST_TILE_ATTRIBUTION: "Example tiles" },
    });
    const response = await request(tiledApp).get("/api/config");
    expect(response.body).toEqual({ mapTiles: { url: "https://tiles.example.org/{z}/{x}/{y}.png", attribution: "Example tiles" } });
  });
});
