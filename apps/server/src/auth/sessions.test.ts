import Database from "better-sqlite3";
import request from "supertest";
import { describe, expect, it, vi } from "vitest";
import type { UploadStatus } from "@calmcrest/contracts";
import { createSiteAndCampaign, postUpload, waitForUpload } from "../routes/test-helpers";
import { DEMO_PASSWORD_FOR_TESTS, SAME_ORIGIN, createTestServer, signedInAgent } from "../test-support";
import { sessionIdOf } from "./lucia.server";
import { argon2 } from "./passwords.server";

const { app, context } = await createTestServer();

/** The token in a response's calmcrest_session cookie. */
function cookieToken(response: request.Response): string {
  const match = /calmcrest_session=([^;]+)/.exec(String(response.headers["set-cookie"]));
  if (!match?.[1]) throw new Error(`no session cookie in ${String(response.headers["set-cookie"])}`);
  return match[1];
}

async function signIn(role = "lead") {
  const response = await request(app).post("/api/auth/sign-in").set(SAME_ORIGIN).send({ email: `${role}@calmcrest.test`, password: DEMO_PASSWORD_FOR_TESTS });
  expect(response.status).toBe(200);
  return cookieToken(response);
}

const DAY_S = 24 * 60 * 60;

describe("session ids are stored hashed", () => {
  it("keeps only the SHA-256 of the cookie's token in the session table", async () => {
    const token = await signIn();
    const rows = await context.db.knex("session").select<{ id: string }[]>("id");
    const ids = rows.map((row) => row.id);
    expect(ids).not.toContain(token);
    expect(ids.some((id) => id.includes(token))).toBe(false);
    expect(ids).toContain(sessionIdOf(token));
    // SHA-256 of "abc" (FIPS 180-2, appendix B.1).
    expect(sessionIdOf("abc")).toBe("ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad");
  });

  it("does not accept a stored id as a cookie (a copy of the database signs nobody in)", async () => {
    const token = await signIn();
    const stolen = sessionIdOf(token);
    const response = await request(app).get("/api/me").set("Cookie", `calmcrest_session=${stolen}`);
    expect(response.status).toBe(401);
    const ok = await request(app).get("/api/me").set("Cookie", `calmcrest_session=${token}`);
    expect(ok.status).toBe(200);
  });
});

describe("sign-in with an unknown e-mail", () => {
  it("runs one Argon2 verification, as a wrong password does", async () => {
    const verify = vi.spyOn(argon2, "verify");
    const unknown = await request(app).post("/api/auth/sign-in").set(SAME_ORIGIN).send({ email: "nobody@calmcrest.test", password: "wrong-password" });
    expect(unknown.status).toBe(401);
    expect(verify).toHaveBeenCalledTimes(1);
    const wrong = await request(app).post("/api/auth/sign-in").set(SAME_ORIGIN).send({ email: "lead@calmcrest.test", password: "wrong-password" });
    expect(wrong.status).toBe(401);
    expect(verify).toHaveBeenCalledTimes(2);
    // The unknown e-mail was checked against a real Argon2id hash (the dummy), not skipped.
    expect(String(verify.mock.calls[0]?.[0])).toMatch(/^\$argon2id\$/);
    expect(unknown.body).toEqual(wrong.body);
  });
});

describe("session refresh and sign-in while another connection holds the write lock", () => {
  it("answer at once, and the refresh and the new session land once the lock is free", async () => {
    const token = await signIn("engineer");
    const id = sessionIdOf(token);
    // A session 8 days old (of 14): past half its life, so Lucia refreshes it on the next request.
    const staleExpiresS = Math.floor(Date.now() / 1000) + 6 * DAY_S;
    await context.db.knex("session").where({ id }).update({ expires_at: staleExpiresS });

    // Like an ingest: another connection holds SQLite's write lock in an open transaction.
    const holder = new Database(context.db.file);
    holder.pragma("busy_timeout = 5000");
    holder.exec("BEGIN IMMEDIATE");
    holder.prepare("UPDATE upload SET error = error WHERE 0").run();
    try {
      const startedMs = performance.now();
      const me = await request(app).get("/api/me").set("Cookie", `calmcrest_session=${token}`);
      const refreshMs = performance.now() - startedMs;
      expect(me.status).toBe(200);
      // The refreshed cookie is sent at once, with the same token.
      expect(cookieToken(me)).toBe(token);
      expect(refreshMs).toBeLessThan(1000);

      const signInStartedMs = performance.now();
      const otherToken = await signIn("committee");
      expect(performance.now() - signInStartedMs).toBeLessThan(1000);
      // The new session works before it is in the database.
      expect((await request(app).get("/api/me").set("Cookie", `calmcrest_session=${otherToken}`)).status).toBe(200);

      expect(context.sessionStore.pendingWrites()).toBe(2);
      const stored = holder.prepare("SELECT expires_at FROM session WHERE id = ?").get(id) as { expires_at: number };
      expect(stored.expires_at).toBe(staleExpiresS);
      expect(holder.prepare("SELECT count(*) AS n FROM session WHERE id = ?").get(sessionIdOf(otherToken))).toEqual({ n: 0 });
    } finally {
      holder.exec("COMMIT");
      holder.close();
    }
    await context.sessionStore.settled();
    expect(context.sessionStore.pendingWrites()).toBe(0);
    const refreshed = await context.db.knex("session").where({ id }).first<{ expires_at: number }>();
    expect(refreshed.expires_at).toBeGreaterThan(staleExpiresS + 7 * DAY_S);
  });

  it("during a real ingest's write transaction: a stale session's request, a sign-in and a sign-out answer at once; the writes land after its commit", async () => {
    const lead = await signedInAgent(app, "lead");
    const { campaign } = await createSiteAndCampaign(lead);
    const token = await signIn("admin");
    const id = sessionIdOf(token);
    const leaving = await signIn("engineer");
    const staleExpiresS = Math.floor(Date.now() / 1000) + 5 * DAY_S;
    await context.db.knex("session").where({ id }).update({ expires_at: staleExpiresS });

    // The ingest holds its commit's write transaction open for 3 s (as a slow disk would).
    context.ingest.testHooks.holdCommitMs = 3000;
    const rows = Array.from({ length: 60 }, (_, index) => `${new Date(Date.UTC(2025, 0, 1, 3, index)).toISOString()},0.8,10`);
    const uploadId = (await postUpload(lead, campaign.id, Buffer.from(["time_utc,seeing_arcsec,zenith_deg", ...rows, ""].join("\n")))).body.upload.id as number;
    while (((await lead.get(`/api/uploads/${uploadId}`)).body as UploadStatus).status !== "ingesting") await new Promise((resolve) => setTimeout(resolve, 10));
    // Wait until the worker holds the write lock: a probe's BEGIN IMMEDIATE then fails at once with SQLITE_BUSY.
    const probe = new Database(context.db.file);
    probe.pragma("busy_timeout = 0");
    for (;;) {
      try {
        probe.exec("BEGIN IMMEDIATE");
        probe.exec("ROLLBACK");
      } catch {
        break;
      }
      await new Promise((resolve) => setTimeout(resolve, 10));
    }
    probe.close();
    try {
      const timed = async <T>(call: () => Promise<T>): Promise<[T, number]> => {
        const startedMs = performance.now();
        const result = await call();
        return [result, performance.now() - startedMs];
      };
      const [me, meMs] = await timed(() => request(app).get("/api/me").set("Cookie", `calmcrest_session=${token}`));
      expect(me.status).toBe(200);
      expect(cookieToken(me)).toBe(token);
      expect(meMs).toBeLessThan(300);
      // A sign-in costs one Argon2 verification (tens of ms), never the ingest's remaining second.
      const [, signInMs] = await timed(() => signIn("committee"));
      expect(signInMs).toBeLessThan(700);
      const [out, outMs] = await timed(() => request(app).post("/api/auth/sign-out").set(SAME_ORIGIN).set("Cookie", `calmcrest_session=${leaving}`).send({}));
      expect(out.status).toBe(200);
      expect(outMs).toBeLessThan(300);
      // Signed out at once, although the delete waits for the ingest.
      expect((await request(app).get("/api/me").set("Cookie", `calmcrest_session=${leaving}`)).status).toBe(401);
      expect(((await lead.get(`/api/uploads/${uploadId}`)).body as UploadStatus).status).toBe("ingesting");
      expect(context.sessionStore.pendingWrites()).toBe(3);
    } finally {
      context.ingest.testHooks.holdCommitMs = undefined;
    }
    expect((await waitForUpload(lead, uploadId)).samples.accepted).toBe(60);
    await context.sessionStore.settled();
    const refreshed = await context.db.knex("session").where({ id }).first<{ expires_at: number }>();
    expect(refreshed.expires_at).toBeGreaterThan(staleExpiresS + 7 * DAY_S);
    expect(await context.db.knex("session").where({ id: sessionIdOf(leaving) }).first()).toBeUndefined();
  });
});

describe("the session read of every request", () => {
  it("gives the same session and user in one statement as step by step, and nothing for an unknown id", async () => {
    const token = await signIn("engineer");
    const id = sessionIdOf(token);
    const [session, user] = await context.sessionStore.getSessionAndUser(id);
    const stored = await context.db.knex("session").where({ id }).first<{ id: string; user_id: string; expires_at: number }>();
    const storedUser = await context.db.knex("user").where({ id: stored.user_id }).first<Record<string, unknown>>();
    expect(session).toEqual({ id, userId: stored.user_id, expiresAt: new Date(stored.expires_at * 1000), attributes: {} });
    const { id: userId, ...attributes } = storedUser;
    expect(user).toEqual({ id: userId, attributes });
    expect(user?.attributes).toMatchObject({ email: "engineer@calmcrest.test", role: "engineer", status: "active" });
    expect(await context.sessionStore.getSessionAndUser(sessionIdOf("no-such-token"))).toEqual([null, null]);
  });
});
