import { randomUUID } from "node:crypto";
import request from "supertest";
import { describe, expect, it, vi } from "vitest";
import { hashPassword } from "../auth/passwords.server";
import { isLoopbackHost, parseEnv } from "../env.server";
import { SAME_ORIGIN, createTestServer } from "../test-support";
import { warnAboutReachableDemo } from "./index";

describe("in production", () => {
  it("creates no demo users and no demo data", async () => {
    const { context } = await createTestServer({ seed: "full", env: { NODE_ENV: "production" } });
    const users = await context.db.knex("user").count<{ count: number }[]>({ count: "*" }).first();
    const sites = await context.db.knex("site").count<{ count: number }[]>({ count: "*" }).first();
    expect(Number(users?.count)).toBe(0);
    expect(Number(sites?.count)).toBe(0);
  });

  it("marks the session cookie Secure as well as HttpOnly and SameSite=Lax", async () => {
    const { app, context } = await createTestServer({ env: { NODE_ENV: "production" } });
    await context.db.knex("user").insert({ id: randomUUID(), email: "real.lead@example.org", name: "A Lead", role: "lead", password_hash: await hashPassword("a-real-password") });
    const response = await request(app).post("/api/auth/sign-in").set(SAME_ORIGIN).send({ email: "real.lead@example.org", password: "a-real-password" });
    expect(response.status).toBe(200);
    const cookie = String(response.headers["set-cookie"]);
    expect(cookie).toMatch(/; Secure/);
    expect(cookie).toMatch(/HttpOnly/i);
    expect(cookie).toMatch(/SameSite=Lax/i);
  });
});

describe("the demo seed and the listening address", () => {
  const userCount = async (knex: import("knex").Knex) => Number((await knex("user").count<{ count: number }[]>({ count: "*" }).first())?.count);

  it("seeds the full demo by default on loopback (npm start on a fresh clone), nothing by default elsewhere", () => {
    expect(parseEnv({ HOST: "127.0.0.1" })).toMatchObject({ CALMCREST_SEED: "full", seedExplicit: false });
    expect(parseEnv({ HOST: "0.0.0.0" })).toMatchObject({ CALMCREST_SEED: "none", seedExplicit: false });
    expect(parseEnv({ HOST: "0.0.0.0", CALMCREST_SEED: "full" })).toMatchObject({ CALMCREST_SEED: "full", seedExplicit: true });
  });

  it("listens on loopback unless HOST says otherwise", () => {
    expect(parseEnv({}).HOST).toBe("127.0.0.1");
    expect(parseEnv({}).listensOnLoopback).toBe(true);
    for (const host of ["localhost", "::1", "[::1]", "127.0.0.2"]) expect(isLoopbackHost(host)).toBe(true);
    for (const host of ["0.0.0.0", "::", "192.168.1.20", "calmcrest.example.org"]) expect(isLoopbackHost(host)).toBe(false);
  });

  it("seeds nothing on 0.0.0.0 unless CALMCREST_SEED is set, and says how to get the demo", async () => {
    const log = vi.spyOn(console, "log");
    const { context } = await createTestServer({ seed: null, env: { HOST: "0.0.0.0" } });
    expect(context.env.CALMCREST_SEED).toBe("none");
    expect(await userCount(context.db.knex)).toBe(0);
    expect(log.mock.calls.map(String).join("\n")).toMatch(/no demo accounts were created because the server listens on 0\.0\.0\.0.*CALMCREST_SEED=full/);
  });

  it("seeds on 0.0.0.0 when CALMCREST_SEED is set explicitly, and warns at start-up that the demo password works from the network", async () => {
    const warn = vi.spyOn(console, "warn").mockImplementation(() => undefined);
    const { context } = await createTestServer({ seed: "users", env: { HOST: "0.0.0.0" } });
    expect(await userCount(context.db.knex)).toBe(4);
    const warnings = warn.mock.calls.map(String).join("\n");
    expect(warnings).toMatch(/WARNING: this is a demo server listening on 0\.0\.0\.0/);
    expect(warnings).toContain("admin@calmcrest.test");
    // Once the demo accounts no longer take the published password, the warning goes away.
    await context.db.knex("user").update({ password_hash: await hashPassword("a-chosen-password") });
    expect(await warnAboutReachableDemo(context)).toBeNull();
  });

  it("gives no warning on loopback", async () => {
    const { context } = await createTestServer({ seed: "users" });
    expect(await warnAboutReachableDemo(context)).toBeNull();
  });
});
