import { randomUUID } from "node:crypto";
import request from "supertest";
import { describe, expect, it } from "vitest";
import { hashPassword } from "../auth/passwords.server";
import { SAME_ORIGIN, createTestServer } from "../test-support";

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
