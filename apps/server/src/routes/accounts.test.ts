import request from "supertest";
import { describe, expect, it } from "vitest";
import type { AuditPage, UserDetail, UserListItem } from "@calmcrest/contracts";
import { DEMO_PASSWORD_FOR_TESTS, SAME_ORIGIN, createAccount, createTestServer, deleteRows, signedInAgent, tableRows, updateRows, userIdOf } from "../test-support";

const { app, context } = await createTestServer();
const admin = await signedInAgent(app, "admin");
const adminId = await userIdOf(context, "admin@calmcrest.test");

const GOOD_PASSWORD = "granite-lantern-orbit-7";

async function newPerson(email: string, role: "admin" | "lead" | "engineer" | "committee" = "engineer", name = "Mira Osei"): Promise<UserListItem> {
  return context.store.users.listItem(await createAccount(context, { email, name, role, password: GOOD_PASSWORD }));
}

/** The token of the newest one-time link e-mailed to `email` (from the outbox, as the person would click it). */
async function linkTokenFor(email: string): Promise<string> {
  await context.signInGuard.settled();
  const [message] = await context.store.outbox.list({ to: email, limit: 1 });
  const url = message?.links[0]?.url;
  if (!url) throw new Error(`No e-mail with a link to ${email}`);
  return new URL(url).searchParams.get("token") ?? "";
}

async function agentFor(email: string, password = GOOD_PASSWORD) {
  const agent = request.agent(app);
  const response = await agent.post("/api/auth/sign-in").set(SAME_ORIGIN).send({ email, password });
  if (response.status !== 200) throw new Error(`sign-in ${email}: ${response.status} ${JSON.stringify(response.body)}`);
  return agent;
}

describe("invitations", () => {
  it("creates an invited account with its campaigns and e-mails a one-time link whose token is stored only hashed", async () => {
    const invited = await admin.post("/api/users/invitations").set(SAME_ORIGIN).send({ email: "Kofi.Mensah@Calmcrest.test", name: "Kofi Mensah", role: "lead" });
    expect(invited.status).toBe(201);
    expect(invited.body).toMatchObject({ email: "kofi.mensah@calmcrest.test", role: "lead", status: "invited", lastSignInAt: null });
    const [message] = await context.store.outbox.list({ to: "kofi.mensah@calmcrest.test" });
    expect(message?.kind).toBe("invitation");
    expect(message?.subject).toBe("Your Calmcrest invitation");
    expect(message?.text).toMatch(/Ines Okafor invites you to Calmcrest/);
    const token = await linkTokenFor("kofi.mensah@calmcrest.test");
    expect(token).toMatch(/^[A-Za-z0-9_-]{43}$/);
    const stored = await tableRows(context, "account_token");
    expect(stored.some((row) => String(row.token_hash).includes(token))).toBe(false);
    // Not yet able to sign in: no password (answered like an unknown account).
    expect((await request(app).post("/api/auth/sign-in").set(SAME_ORIGIN).send({ email: "kofi.mensah@calmcrest.test", password: "" })).status).toBe(400);
    expect((await admin.post("/api/users/invitations").set(SAME_ORIGIN).send({ email: "kofi.mensah@calmcrest.test", name: "Again", role: "lead" })).status).toBe(409);
  });

  it("refuses a password that breaks the rules, naming each problem, then sets a good one once: the person signs in, the link is spent", async () => {
    await admin.post("/api/users/invitations").set(SAME_ORIGIN).send({ email: "ama.owusu@calmcrest.test", name: "Ama Owusu", role: "committee" });
    const token = await linkTokenFor("ama.owusu@calmcrest.test");
    const info = await request(app).get(`/api/auth/password-links/${token}`);
    expect(info.body).toMatchObject({ purpose: "invite", email: "ama.owusu@calmcrest.test", name: "Ama Owusu" });
    const setPassword = (password: string) => request(app).post(`/api/auth/password-links/${token}`).set(SAME_ORIGIN).send({ password });
    expect((await setPassword("short-pass")).body.error.fields.password).toEqual(["Use at least 12 characters (this one has 10)."]);
    expect((await setPassword("Ama.Owusu-2026!")).body.error.fields.password).toEqual(["Do not use your e-mail address or your name in the password."]);
    expect((await setPassword("Password1234")).body.error.fields.password).toEqual(["This is a commonly used password that is guessed early; choose another."]);
    expect((await setPassword("calmcrest-demo")).status).toBe(400);
    const set = await setPassword(GOOD_PASSWORD);
    expect(set.status).toBe(200);
    expect(((await admin.get("/api/users")).body as UserListItem[]).find((user) => user.email === "ama.owusu@calmcrest.test")?.status).toBe("active");
    await agentFor("ama.owusu@calmcrest.test");
    const reused = await setPassword("another-good-phrase-5");
    expect(reused.status).toBe(410);
    expect(reused.body.error.code).toBe("link_used");
    expect(reused.body.error.message).toMatch(/used already; each link works once/);
    expect((await request(app).get(`/api/auth/password-links/${token}`)).status).toBe(410);
  });

  it("refuses an expired link with the date it expired and what to do", async () => {
    const invited = (await admin.post("/api/users/invitations").set(SAME_ORIGIN).send({ email: "late.person@calmcrest.test", name: "Late Person", role: "lead" })).body as UserListItem;
    const token = await linkTokenFor("late.person@calmcrest.test");
    await updateRows(context, "account_token", { user_id: invited.id }, { expires_at: "2026-01-01T00:00:00.000Z" });
    const expired = await request(app).post(`/api/auth/password-links/${token}`).set(SAME_ORIGIN).send({ password: GOOD_PASSWORD });
    expect(expired.status).toBe(410);
    expect(expired.body.error.message).toBe("This invitation expired on 2026-01-01 00:00 UTC. Ask an administrator to send a new invitation.");
    // A new link from the person's page works, and the old one stays dead.
    const resent = await admin.post(`/api/users/${invited.id}/password-link`).set(SAME_ORIGIN);
    expect(resent.body.purpose).toBe("invite");
    const fresh = await linkTokenFor("late.person@calmcrest.test");
    expect(fresh).not.toBe(token);
    expect((await request(app).post(`/api/auth/password-links/${fresh}`).set(SAME_ORIGIN).send({ password: GOOD_PASSWORD })).status).toBe(200);
  });

  it("gives an invited engineer the chosen campaigns, and records the invitation and the password in the audit log", async () => {
    const lead = await signedInAgent(app, "lead");
    const site = (await lead.post("/api/sites").set(SAME_ORIGIN).send({ name: "Invite Ridge", latitude: -24, longitude: -69, elevationM: 3000 })).body as { id: number };
    const campaign = (await lead.post(`/api/sites/${site.id}/campaigns`).set(SAME_ORIGIN).send({ name: "Invite campaign", monitor: { apertureMm: 60, baselineMm: 200, wavelengthNm: 500 } })).body as { id: number };
    const invited = await admin.post("/api/users/invitations").set(SAME_ORIGIN).send({ email: "field.new@calmcrest.test", name: "Field New", role: "engineer", campaignIds: [campaign.id] });
    expect(invited.body.campaigns.map((item: { id: number }) => item.id)).toEqual([campaign.id]);
    expect((await admin.post("/api/users/invitations").set(SAME_ORIGIN).send({ email: "ghost.campaign@calmcrest.test", name: "Ghost", role: "engineer", campaignIds: [999_999] })).status).toBe(400);
    const token = await linkTokenFor("field.new@calmcrest.test");
    await request(app).post(`/api/auth/password-links/${token}`).set(SAME_ORIGIN).send({ password: GOOD_PASSWORD });
    const engineer = await agentFor("field.new@calmcrest.test");
    expect(((await engineer.get("/api/sites")).body as { id: number }[]).map((item) => item.id)).toEqual([site.id]);
    const rows = await context.store.audit.list({ targetType: "user", targetId: invited.body.id });
    expect(rows.map((row) => row.action)).toEqual(["user.invite", "auth.password_set", "auth.sign_in"]);
    expect(rows[1]?.details).toEqual({ via: "invitation" });
  });
});

describe("password reset by e-mail", () => {
  it("answers the same at once for a known and an unknown address, e-mails a link only to the account, and ends its old sessions", async () => {
    const person = await newPerson("forgetful@calmcrest.test", "lead", "Forgetful Person");
    const open = await agentFor(person.email);
    const known = await request(app).post("/api/auth/password-reset").set(SAME_ORIGIN).send({ email: "Forgetful@Calmcrest.test" });
    const unknown = await request(app).post("/api/auth/password-reset").set(SAME_ORIGIN).send({ email: "nobody.at.all@calmcrest.test" });
    expect(known.status).toBe(202);
    expect(unknown.status).toBe(202);
    expect(known.body.message.replace("forgetful@calmcrest.test", "X")).toBe(unknown.body.message.replace("nobody.at.all@calmcrest.test", "X"));
    await context.signInGuard.settled();
    expect(await context.store.outbox.list({ to: "nobody.at.all@calmcrest.test" })).toEqual([]);
    const token = await linkTokenFor(person.email);
    expect((await request(app).get(`/api/auth/password-links/${token}`)).body.purpose).toBe("reset");
    expect((await request(app).post(`/api/auth/password-links/${token}`).set(SAME_ORIGIN).send({ password: "Forgetful-Person-1" })).status).toBe(400);
    expect((await request(app).post(`/api/auth/password-links/${token}`).set(SAME_ORIGIN).send({ password: "harbour-lichen-comet-4" })).status).toBe(200);
    expect((await open.get("/api/me")).status).toBe(401);
    expect((await request(app).post("/api/auth/sign-in").set(SAME_ORIGIN).send({ email: person.email, password: GOOD_PASSWORD })).status).toBe(401);
    await agentFor(person.email, "harbour-lichen-comet-4");
    const rows = await context.store.audit.list({ targetType: "user", targetId: person.id });
    expect(rows.filter((row) => row.action.startsWith("auth.password")).map((row) => [row.action, row.details.by ?? row.details.via])).toEqual([
      ["auth.password_reset_requested", "self"],
      ["auth.password_set", "reset"],
    ]);
  });

  it("sends at most 3 reset e-mails to one address in 15 minutes, with the same answer every time", async () => {
    const person = await newPerson("impatient@calmcrest.test", "lead", "Impatient Person");
    const answers = [];
    for (let attempt = 0; attempt < 5; attempt += 1) answers.push((await request(app).post("/api/auth/password-reset").set(SAME_ORIGIN).send({ email: person.email })).body.message);
    expect(new Set(answers).size).toBe(1);
    await context.signInGuard.settled();
    expect(await context.store.outbox.list({ to: person.email })).toHaveLength(3);
  });

  it("sends no link to a deactivated account, and a link made before deactivation no longer works", async () => {
    const person = await newPerson("soon.gone@calmcrest.test", "lead", "Soon Gone");
    await admin.post(`/api/users/${person.id}/password-link`).set(SAME_ORIGIN).expect(200);
    const token = await linkTokenFor(person.email);
    await admin.post(`/api/users/${person.id}/deactivate`).set(SAME_ORIGIN).expect(200);
    expect((await request(app).post(`/api/auth/password-links/${token}`).set(SAME_ORIGIN).send({ password: "harbour-lichen-comet-4" })).status).toBe(403);
    expect((await admin.post(`/api/users/${person.id}/password-link`).set(SAME_ORIGIN)).status).toBe(409);
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
    await expect(updateRows(context, "audit_log", {}, { action: "site.create" })).rejects.toThrow(/never updated/);
    await expect(deleteRows(context, "audit_log")).rejects.toThrow(/never deleted/);
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
