import request from "supertest";
import { describe, expect, it } from "vitest";
import type { AuditPage, UserDetail, UserListItem } from "@calmcrest/contracts";
import { DEMO_PASSWORD_FOR_TESTS, SAME_ORIGIN, createTestServer, signedInAgent, userIdOf } from "../test-support";

const { app, context } = await createTestServer();
const admin = await signedInAgent(app, "admin");
const adminId = await userIdOf(context, "admin@calmcrest.test");

const GOOD_PASSWORD = "granite-lantern-orbit-7";

async function newPerson(email: string, role: "admin" | "lead" | "engineer" | "committee" = "engineer", name = "Mira Osei"): Promise<UserListItem> {
  const response = await admin.post("/api/users").set(SAME_ORIGIN).send({ email, name, role, password: GOOD_PASSWORD });
  if (response.status !== 201) throw new Error(`create ${email}: ${response.status} ${JSON.stringify(response.body)}`);
  return response.body as UserListItem;
}

async function agentFor(email: string, password = GOOD_PASSWORD) {
  const agent = request.agent(app);
  const response = await agent.post("/api/auth/sign-in").set(SAME_ORIGIN).send({ email, password });
  if (response.status !== 200) throw new Error(`sign-in ${email}: ${response.status} ${JSON.stringify(response.body)}`);
  return agent;
}

describe("password rules on the server", () => {
  it("refuses a short password, one holding the e-mail or name, and a common one, naming each problem", async () => {
    const tryPassword = (password: string) => admin.post("/api/users").set(SAME_ORIGIN).send({ email: "kofi.mensah@calmcrest.test", name: "Kofi Mensah", role: "lead", password });
    const short = await tryPassword("short-pass");
    expect(short.status).toBe(400);
    expect(short.body.error.fields.password).toEqual(["Use at least 12 characters (this one has 10)."]);
    expect((await tryPassword("Kofi.Mensah-2026")).body.error.fields.password).toEqual(["Do not use your e-mail address or your name in the password."]);
    expect((await tryPassword("kofimensah@calmcrest")).status).toBe(400);
    expect((await tryPassword("Password1234")).body.error.fields.password).toEqual(["This is a commonly used password that is guessed early; choose another."]);
    expect((await tryPassword("calmcrest-demo")).status).toBe(400);
    expect((await tryPassword(GOOD_PASSWORD)).status).toBe(201);
  });
});

describe("role changes", () => {
  it("refuses to demote the last active administrator with a 409 that says what to do, and allows it once another exists", async () => {
    const refused = await admin.patch(`/api/users/${adminId}`).set(SAME_ORIGIN).send({ role: "lead" });
    expect(refused.status).toBe(409);
    expect(refused.body.error.code).toBe("last_admin");
    expect(refused.body.error.message).toMatch(/last active administrator.*Make another person an administrator first/);
    expect(((await admin.get(`/api/users/${adminId}`)).body as UserDetail).lastActiveAdmin).toBe(true);

    const second = await newPerson("second.admin@calmcrest.test", "admin", "Second Admin");
    expect(((await admin.get(`/api/users/${adminId}`)).body as UserDetail).lastActiveAdmin).toBe(false);
    const secondAgent = await agentFor(second.email);
    // The second administrator cannot be deactivated while the first is... still active: both may go one at a time.
    const demoted = await secondAgent.patch(`/api/users/${second.id}`).set(SAME_ORIGIN).send({ role: "lead" });
    expect(demoted.status).toBe(200);
    // Now the demo administrator is the last one again.
    expect((await admin.patch(`/api/users/${adminId}`).set(SAME_ORIGIN).send({ role: "committee" })).status).toBe(409);
    // The demoted person lost the administrator routes at once.
    expect((await secondAgent.get("/api/users")).status).toBe(403);
  });

  it("records an undo as such, and a change to the same role is a 409 with nothing written", async () => {
    const person = await newPerson("undo.person@calmcrest.test", "engineer", "Undo Person");
    expect((await admin.patch(`/api/users/${person.id}`).set(SAME_ORIGIN).send({ role: "lead" })).status).toBe(200);
    expect((await admin.patch(`/api/users/${person.id}`).set(SAME_ORIGIN).send({ role: "engineer", undo: true })).status).toBe(200);
    expect((await admin.patch(`/api/users/${person.id}`).set(SAME_ORIGIN).send({ role: "engineer" })).status).toBe(409);
    const rows = await context.store.audit.list({ targetType: "user", targetId: person.id });
    expect(rows.filter((row) => row.action === "user.role").map((row) => row.details)).toEqual([
      { from: "engineer", to: "lead" },
      { from: "lead", to: "engineer", undo: true },
    ]);
  });
});

describe("deactivation", () => {
  it("ends the person's open sessions at once, refuses their sign-in, and reactivation lets them back in", async () => {
    const person = await newPerson("leaving@calmcrest.test", "lead", "Leaving Person");
    const open = await agentFor(person.email);
    expect((await open.get("/api/me")).status).toBe(200);
    const deactivated = await admin.post(`/api/users/${person.id}/deactivate`).set(SAME_ORIGIN);
    expect(deactivated.status).toBe(200);
    expect(deactivated.body.status).toBe("deactivated");
    expect((await open.get("/api/me")).status).toBe(401);
    const again = await request(app).post("/api/auth/sign-in").set(SAME_ORIGIN).send({ email: person.email, password: GOOD_PASSWORD });
    expect(again.status).toBe(403);
    expect(again.body.error.message).toMatch(/deactivated.*Ask an administrator/);
    // A wrong password gets the ordinary answer: only the password's owner learns the account is deactivated.
    expect((await request(app).post("/api/auth/sign-in").set(SAME_ORIGIN).send({ email: person.email, password: "not-the-password-at-all" })).status).toBe(401);
    // Never deleted: still listed.
    expect(((await admin.get("/api/users")).body as UserListItem[]).some((user) => user.id === person.id)).toBe(true);
    expect((await admin.post(`/api/users/${person.id}/reactivate`).set(SAME_ORIGIN)).body.status).toBe("active");
    expect((await (await agentFor(person.email)).get("/api/me")).status).toBe(200);
  });

  it("refuses to deactivate one's own account", async () => {
    const response = await admin.post(`/api/users/${adminId}/deactivate`).set(SAME_ORIGIN);
    expect(response.status).toBe(409);
    expect(response.body.error.code).toBe("own_account");
  });
});

describe("sign-out everywhere", () => {
  it("ends every session of the person, by themselves or by an administrator", async () => {
    const person = await newPerson("two.devices@calmcrest.test", "lead", "Two Devices");
    const laptop = await agentFor(person.email);
    const phone = await agentFor(person.email);
    expect((await laptop.post("/api/auth/sign-out-everywhere").set(SAME_ORIGIN)).status).toBe(200);
    expect((await phone.get("/api/me")).status).toBe(401);
    expect((await laptop.get("/api/me")).status).toBe(401);
    const tablet = await agentFor(person.email);
    expect((await admin.post(`/api/users/${person.id}/sign-out-everywhere`).set(SAME_ORIGIN)).status).toBe(200);
    expect((await tablet.get("/api/me")).status).toBe(401);
    const rows = await context.store.audit.list({ targetType: "user", targetId: person.id });
    expect(rows.filter((row) => row.action === "auth.sign_out_everywhere").map((row) => row.details)).toEqual([{ by: "self" }, { by: "admin" }]);
  });
});

describe("changing an e-mail address", () => {
  it("changes it (lower-cased), refuses one another account has, and the person signs in with the new one", async () => {
    const person = await newPerson("old.address@calmcrest.test", "lead", "Moving Person");
    const changed = await admin.post(`/api/users/${person.id}/email`).set(SAME_ORIGIN).send({ email: "New.Address@Calmcrest.test" });
    expect(changed.status).toBe(200);
    expect(changed.body.email).toBe("new.address@calmcrest.test");
    expect((await admin.post(`/api/users/${person.id}/email`).set(SAME_ORIGIN).send({ email: "lead@calmcrest.test" })).status).toBe(409);
    await agentFor("new.address@calmcrest.test");
  });
});

describe("sign-in records", () => {
  it("writes a failed-sign-in row for an unknown e-mail and a wrong password alike, and a sign-in row with the last sign-in time", async () => {
    await request(app).post("/api/auth/sign-in").set(SAME_ORIGIN).send({ email: "ghost@calmcrest.test", password: "whatever-it-is" });
    await request(app).post("/api/auth/sign-in").set(SAME_ORIGIN).send({ email: "committee@calmcrest.test", password: "whatever-it-is" });
    await signedInAgent(app, "committee");
    await context.signInGuard.settled();
    const failures = (await context.store.audit.list()).filter((row) => row.action === "auth.sign_in_failed").slice(-2);
    expect(failures.map((row) => [row.details.email, row.details.reason, row.details.knownAccount])).toEqual([
      ["ghost@calmcrest.test", "bad_credentials", false],
      ["committee@calmcrest.test", "bad_credentials", true],
    ]);
    const committeeId = await userIdOf(context, "committee@calmcrest.test");
    const detail = (await admin.get(`/api/users/${committeeId}`)).body as UserDetail;
    expect(Date.now() - Date.parse(String(detail.lastSignInAt))).toBeLessThan(60_000);
    expect(detail.recentActions.map((row) => row.action).slice(0, 2)).toEqual(["auth.sign_in", "auth.sign_in_failed"]);
  });
});

describe("the audit log", () => {
  it("is for administrators only", async () => {
    expect((await (await signedInAgent(app, "lead")).get("/api/audit")).status).toBe(403);
    expect((await request(app).get("/api/audit")).status).toBe(401);
  });

  it("filters by person, action and date, newest first, in pages", async () => {
    const all = (await admin.get("/api/audit?pageSize=5")).body as AuditPage;
    expect(all.rows).toHaveLength(5);
    expect(all.total).toBeGreaterThan(10);
    expect(all.rows.map((row) => row.id)).toEqual(all.rows.map((row) => row.id).sort((a, b) => b - a));
    const second = (await admin.get("/api/audit?pageSize=5&page=2")).body as AuditPage;
    expect(second.rows[0]?.id).toBeLessThan(all.rows[4]?.id ?? 0);

    const roles = (await admin.get("/api/audit?action=user.role&pageSize=500")).body as AuditPage;
    expect(roles.rows.length).toBeGreaterThan(0);
    expect(new Set(roles.rows.map((row) => row.action))).toEqual(new Set(["user.role"]));
    expect(roles.rows[0]?.summary).toMatch(/^Role /);

    const mine = (await admin.get(`/api/audit?userId=${adminId}&pageSize=500`)).body as AuditPage;
    expect(mine.rows.every((row) => row.actor?.id === adminId || row.targetId === adminId)).toBe(true);

    const today = new Date().toISOString().slice(0, 10);
    expect(((await admin.get(`/api/audit?from=${today}&to=${today}`)).body as AuditPage).total).toBe(all.total);
    expect(((await admin.get("/api/audit?to=2000-01-01")).body as AuditPage).total).toBe(0);
    const bad = await admin.get("/api/audit?action=drop.tables");
    expect(bad.status).toBe(400);
    expect(bad.body.error.message).toMatch(/action/);
  });

  it("exports spreadsheet-safe CSV", async () => {
    // A name that a spreadsheet would run as a formula.
    await newPerson("formula@calmcrest.test", "lead", "=HYPERLINK(\"http://x\")");
    const csv = await admin.get("/api/audit/export.csv?action=user.create");
    expect(csv.status).toBe(200);
    expect(csv.headers["content-type"]).toMatch(/text\/csv/);
    expect(csv.headers["content-disposition"]).toMatch(/attachment; filename="calmcrest-audit-/);
    const lines = csv.text.trim().split("\n");
    expect(lines[0]).toBe('"id","at_utc","actor_name","actor_email","action","action_label","target_type","target_id","summary","details_json"');
    expect(csv.text).not.toMatch(/(^|,)"=HYPERLINK/m);
    expect(csv.text).toContain(`"Account for =HYPERLINK(""http://x"") <formula@calmcrest.test> as Survey lead"`);
  });

  it("cannot be changed or emptied, even by a direct query", async () => {
    await expect(context.db.knex("audit_log").update({ action: "site.create" })).rejects.toThrow(/never updated/);
    await expect(context.db.knex("audit_log").delete()).rejects.toThrow(/never deleted/);
  });
});

describe("sign-in protection", () => {
  it("after 5 failures on one account answers 429 with the wait, even for the right password, for that account only", async () => {
    const person = await newPerson("target@calmcrest.test", "lead", "Target Person");
    for (let attempt = 0; attempt < 5; attempt += 1) {
      expect((await request(app).post("/api/auth/sign-in").set(SAME_ORIGIN).send({ email: person.email, password: `wrong-${attempt}-password` })).status).toBe(401);
    }
    const limited = await request(app).post("/api/auth/sign-in").set(SAME_ORIGIN).send({ email: person.email, password: GOOD_PASSWORD });
    expect(limited.status).toBe(429);
    expect(Number(limited.headers["retry-after"])).toBeGreaterThan(14 * 60);
    expect(limited.body.error.message).toMatch(/Wait 15 minutes, then try again/);
    // An unknown e-mail is limited the same way (the limit does not tell which accounts exist).
    for (let attempt = 0; attempt < 5; attempt += 1) await request(app).post("/api/auth/sign-in").set(SAME_ORIGIN).send({ email: "nobody.here@calmcrest.test", password: "wrong-password-x" });
    expect((await request(app).post("/api/auth/sign-in").set(SAME_ORIGIN).send({ email: "nobody.here@calmcrest.test", password: "wrong-password-x" })).status).toBe(429);
    // Other accounts from the same address are not held up.
    expect((await request(app).post("/api/auth/sign-in").set(SAME_ORIGIN).send({ email: "lead@calmcrest.test", password: DEMO_PASSWORD_FOR_TESTS })).status).toBe(200);
    await context.signInGuard.settled();
    const limitedRows = (await context.store.audit.list({ targetType: "user", targetId: person.id })).filter((row) => row.details.reason === "rate_limited");
    expect(limitedRows).toHaveLength(1);
  });
});
