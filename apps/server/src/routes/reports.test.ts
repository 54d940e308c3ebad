import { join } from "node:path";
import request from "supertest";
import { describe, expect, it } from "vitest";
import { writeSyntheticLog } from "@calmcrest/seeing-stats/node";
import type { OutboxList, OutboxMessage, ReportComments, ReportDetail, ReportListItem, ReportVersionView, SiteListItem } from "@calmcrest/contracts";
import { expectConsoleError } from "../../../../tests/support/fail-on-console-error";
import { seedDemoScenario } from "../seed/demo-scenario";
import { monitorOf } from "../store/index";
import { countRows, createAccount, createTestServer, finishedUploadHashes, refuseInsertsInto, SAME_ORIGIN, signedInAgent, updateRows, userIdOf } from "../test-support";
import { postUpload, waitForUpload } from "./test-helpers";

// The report loop end to end through the API, on the demo ridges at a tenth of their length.
const { app, context, dataDir } = await createTestServer();
await seedDemoScenario(context, { nightsScale: 0.1 });
const lead = await signedInAgent(app, "lead");
const admin = await signedInAgent(app, "admin");
const committee = await signedInAgent(app, "committee");
const engineer = await signedInAgent(app, "engineer");
const sites = (await lead.get("/api/sites")).body as SiteListItem[];
const idOf = (name: string): number => sites.find((site) => site.name === name)?.id ?? 0;
const comparison = { sites: `${idOf("Tern Ridge")},${idOf("Quartz Shoulder")}` };
const committeeId = await userIdOf(context, "committee@calmcrest.test");

async function outboxTo(email: string): Promise<OutboxMessage[]> {
  await context.mail.idle();
  return ((await admin.get("/api/outbox")).body as OutboxList).messages.filter((message) => message.to === email);
}

async function newReport(title: string): Promise<ReportDetail> {
  const response = await lead.post("/api/reports").set(SAME_ORIGIN).send({ title, summary: "Which ridge gives the sharpest images.", comparison });
  expect(response.status).toBe(201);
  return response.body as ReportDetail;
}

describe("a report from a comparison", async () => {
  const created = await newReport("Ridge comparison");
  const reportId = created.id;

  it("starts as a draft with the suggested sections, seen by leads and admins only", async () => {
    expect(created.status).toBe("draft");
    expect(created.draft?.sections.map((section) => section.title)).toEqual(["Method", "Results", "Caveats", "Recommendation"]);
    expect(created.version).toBeNull();
    expect(((await admin.get("/api/reports")).body as ReportListItem[]).map((report) => report.id)).toContain(reportId);
    expect(((await committee.get("/api/reports")).body as ReportListItem[]).map((report) => report.id)).not.toContain(reportId);
    const hidden = await committee.get(`/api/reports/${reportId}`);
    expect(hidden.status).toBe(404);
    expect(hidden.body).toEqual({ error: { code: "not_found", message: expect.stringMatching(/does not exist, or your account has no access/) } });
    expect((await committee.get(`/api/reports/${reportId}/comments`)).status).toBe(404);
    expect((await engineer.get("/api/reports")).status).toBe(403);
  });

  it("refuses a comparison that names no real site, saying which setting is wrong", async () => {
    const response = await lead.post("/api/reports").set(SAME_ORIGIN).send({ title: "Bad", comparison: { sites: "1" } });
    expect(response.status).toBe(400);
    expect(response.body.error.message).toMatch(/sites must list 2 to 6 sites/);
    const unknown = await lead.post("/api/reports").set(SAME_ORIGIN).send({ title: "Bad", comparison: { sites: "9998,9999" } });
    expect(unknown.status).toBe(400);
    expect(await countRows(context, "report", { title: "Bad" })).toBe(0);
  });

  it("lets the lead add, rename, rewrite, reorder and delete sections", async () => {
    const [method, results, caveats, recommendation] = created.draft?.sections ?? [];
    await lead.patch(`/api/reports/${reportId}/sections/${results?.id}`).set(SAME_ORIGIN).send({ body: "Quartz Shoulder is sharper on **common nights**." }).expect(200);
    await lead.patch(`/api/reports/${reportId}/sections/${method?.id}`).set(SAME_ORIGIN).send({ title: "How we measured", body: "DIMM, Tokovinin Z-tilt." }).expect(200);
    const added = (await lead.post(`/api/reports/${reportId}/sections`).set(SAME_ORIGIN).send({ title: "Appendix", body: "Raw notes.", position: 1 }).expect(201)).body as ReportDetail;
    expect(added.draft?.sections.map((section) => section.title)).toEqual(["How we measured", "Appendix", "Results", "Caveats", "Recommendation"]);
    const appendix = added.draft?.sections[1];
    await lead.delete(`/api/reports/${reportId}/sections/${appendix?.id}`).set(SAME_ORIGIN).expect(200);
    const order = [results?.id, method?.id, caveats?.id, recommendation?.id];
    const reordered = (await lead.put(`/api/reports/${reportId}/sections/order`).set(SAME_ORIGIN).send({ sectionIds: order }).expect(200)).body as ReportDetail;
    expect(reordered.draft?.sections.map((section) => section.title)).toEqual(["Results", "How we measured", "Caveats", "Recommendation"]);
    const stale = await lead.put(`/api/reports/${reportId}/sections/order`).set(SAME_ORIGIN).send({ sectionIds: [results?.id] });
    expect(stale.status).toBe(409);
    expect(stale.body.error.message).toMatch(/Reload the report/);
    expect((await committee.patch(`/api/reports/${reportId}/sections/${results?.id}`).set(SAME_ORIGIN).send({ body: "x" })).status).toBe(403);
  });

  let v1: ReportVersionView;
  it("publishes a frozen version 1 and e-mails the committee member it is shared with, in the same transaction", async () => {
    const response = await lead.post(`/api/reports/${reportId}/versions`).set(SAME_ORIGIN).send({ note: "First reading" });
    expect(response.status).toBe(201);
    v1 = response.body as ReportVersionView;
    expect(v1).toMatchObject({ number: 1, latestNumber: 1, note: "First reading", title: "Ridge comparison", changes: null, newerData: { uploadsSince: 0 } });
    expect(v1.sections.map((section) => section.title)).toEqual(["Results", "How we measured", "Caveats", "Recommendation"]);
    expect(v1.comparison.rows.map((row) => row.label).sort()).toEqual(["Quartz Shoulder", "Tern Ridge"]);
    // Every finished upload of the two ridges' campaigns, each by sha256.
    const stored = await finishedUploadHashes(context, [idOf("Tern Ridge"), idOf("Quartz Shoulder")]);
    expect(stored.length).toBeGreaterThanOrEqual(4);
    expect(v1.uploads.map((upload) => upload.sha256).sort()).toEqual(stored.sort());
    for (const upload of v1.uploads) expect(upload.sha256).toMatch(/^[0-9a-f]{64}$/);
    expect(v1.comparison.coefficientSets.length).toBeGreaterThan(0);
    expect(v1.comparison.rows[0]?.statistics?.cdf.length).toBeLessThanOrEqual(101);

    const mail = await outboxTo("committee@calmcrest.test");
    expect(mail).toHaveLength(1);
    expect(mail[0]).toMatchObject({ kind: "report_published", status: "sent", subject: "Report published: Ridge comparison (version 1)" });
    expect(mail[0]?.links).toEqual([{ label: "Read the report", url: `http://calmcrest.test/reports/${reportId}?version=1` }]);
    expect(mail[0]?.text).toContain(`computed from ${stored.length} uploads`);
    // Nobody else was written to (the other demo users are not committee members).
    expect(await outboxTo("engineer@calmcrest.test")).toEqual([]);
  });

  it("lets the committee read the latest published version, without the draft", async () => {
    const list = (await committee.get("/api/reports")).body as ReportListItem[];
    expect(list.find((report) => report.id === reportId)).toMatchObject({ status: "published", latestVersion: { number: 1 }, subjects: expect.arrayContaining(["Tern Ridge"]) });
    const detail = (await committee.get(`/api/reports/${reportId}`)).body as ReportDetail;
    expect(detail.draft).toBeNull();
    expect(detail.version?.number).toBe(1);
    expect(detail.versions.map((version) => version.number)).toEqual([1]);
    expect(detail.can).toEqual({ edit: false, publish: false, comment: true, moderate: false });
    expect((await committee.get(`/api/reports/${reportId}/versions/1`)).status).toBe(200);
    expect((await committee.get(`/api/reports/${reportId}/versions/2`)).status).toBe(404);
    // A later edit of the draft stays with the lead until it is published.
    await lead.patch(`/api/reports/${reportId}`).set(SAME_ORIGIN).send({ summary: "Draft wording, not published yet." }).expect(200);
    const again = ((await committee.get("/api/reports")).body as ReportListItem[]).find((report) => report.id === reportId);
    expect(again?.summary).toBe("Which ridge gives the sharpest images.");
    expect(((await committee.get(`/api/reports/${reportId}`)).body as ReportDetail).version?.summary).toBe("Which ridge gives the sharpest images.");
  });

  let threadId = 0;
  it("takes a committee comment on a section, e-mails the lead, and threads the lead's reply to the participants", async () => {
    const results = v1.sections[0];
    const posted = await committee.post(`/api/reports/${reportId}/comments`).set(SAME_ORIGIN).send({ body: "Is the *Quartz* margin robust to the season?", version: 1, sectionId: results?.id });
    expect(posted.status).toBe(201);
    threadId = posted.body.id as number;
    const toLead = await outboxTo("lead@calmcrest.test");
    expect(toLead).toHaveLength(1);
    expect(toLead[0]).toMatchObject({ kind: "comment_new", subject: `New comment on “Ridge comparison”: section “Results”` });
    expect(toLead[0]?.links.map((link) => link.url)).toEqual([`http://calmcrest.test/reports/${reportId}#comment-${threadId}`, `http://calmcrest.test/reports/${reportId}#section-${results?.id}`]);
    expect(toLead[0]?.html).toContain("<em>Quartz</em>");

    const reply = await lead.post(`/api/reports/${reportId}/comments`).set(SAME_ORIGIN).send({ body: "Yes: see the season-balanced median.", version: 1, parentId: threadId });
    expect(reply.status).toBe(201);
    const threads = (reply.body as ReportComments).threads;
    expect(threads).toHaveLength(1);
    expect(threads[0]).toMatchObject({ id: threadId, sectionId: results?.id, sectionTitle: "Results", version: 1, status: "open" });
    expect(threads[0]?.comments.map((comment) => comment.author.name)).toHaveLength(2);
    const toCommittee = await outboxTo("committee@calmcrest.test");
    expect(toCommittee.map((message) => message.kind)).toEqual(["comment_reply", "report_published"]);
  });

  it("lets the author edit within 15 minutes, not after, and withdraw without deleting", async () => {
    await committee.patch(`/api/comments/${threadId}`).set(SAME_ORIGIN).send({ action: "edit", body: "Is the Quartz margin robust to season and height?" }).expect(200);
    expect((await lead.patch(`/api/comments/${threadId}`).set(SAME_ORIGIN).send({ action: "edit", body: "hijack" })).status).toBe(403);
    // 16 minutes later:
    await updateRows(context, "report_comment", { id: threadId }, { created_at: new Date(Date.now() - 16 * 60_000).toISOString() });
    const late = await committee.patch(`/api/comments/${threadId}`).set(SAME_ORIGIN).send({ action: "edit", body: "too late" });
    expect(late.status).toBe(409);
    expect(late.body.error.message).toMatch(/15 minutes/);
    const extra = await committee.post(`/api/reports/${reportId}/comments`).set(SAME_ORIGIN).send({ body: "Never mind this one.", version: 1 });
    const withdrawn = (await committee.patch(`/api/comments/${extra.body.id}`).set(SAME_ORIGIN).send({ action: "withdraw" }).expect(200)).body as ReportComments;
    const shown = withdrawn.threads.find((thread) => thread.id === extra.body.id)?.comments[0];
    expect(shown).toMatchObject({ withdrawn: true, body: null });
    expect(await countRows(context, "report_comment", { id: extra.body.id, body: "Never mind this one." })).toBe(1);
  });

  it("lets the lead resolve a thread (e-mailing its participants) and reopen it; a committee member cannot resolve another's thread", async () => {
    const other = await signedInAgent(app, "admin");
    const before = (await outboxTo("committee@calmcrest.test")).length;
    const resolved = (await lead.patch(`/api/comments/${threadId}`).set(SAME_ORIGIN).send({ action: "resolve" }).expect(200)).body as ReportComments;
    expect(resolved.threads.find((thread) => thread.id === threadId)).toMatchObject({ status: "resolved", resolvedBy: { name: expect.any(String) } });
    const after = await outboxTo("committee@calmcrest.test");
    expect(after).toHaveLength(before + 1);
    expect(after[0]).toMatchObject({ kind: "thread_resolved" });
    await other.patch(`/api/comments/${threadId}`).set(SAME_ORIGIN).send({ action: "reopen" }).expect(200);
    const leadThread = (await lead.post(`/api/reports/${reportId}/comments`).set(SAME_ORIGIN).send({ body: "A note of my own.", version: 1 })).body.id as number;
    expect((await committee.patch(`/api/comments/${leadThread}`).set(SAME_ORIGIN).send({ action: "resolve" })).status).toBe(403);
  });

  it("sends no comment e-mails to someone who turned them off, but still the publication e-mail", async () => {
    await committee.patch("/api/me/preferences").set(SAME_ORIGIN).send({ commentEmails: false }).expect(200);
    expect((await committee.get("/api/me/preferences")).body).toEqual({ commentEmails: false });
    const before = (await outboxTo("committee@calmcrest.test")).length;
    await lead.post(`/api/reports/${reportId}/comments`).set(SAME_ORIGIN).send({ body: "Another reply.", version: 1, parentId: threadId }).expect(201);
    expect(await outboxTo("committee@calmcrest.test")).toHaveLength(before);
    await committee.patch("/api/me/preferences").set(SAME_ORIGIN).send({ commentEmails: true }).expect(200);
  });

  it("keeps version 1's numbers after a new upload, and says newer data exists", async () => {
    const campaignId = v1.comparison.rows.find((row) => row.label === "Quartz Shoulder")?.campaigns[0]?.id ?? 0;
    const campaign = await context.store.campaigns.require(campaignId);
    const path = join(dataDir, "quartz-later.csv");
    await writeSyntheticLog(path, { seed: 77, site: { latitudeDeg: -26.105, longitudeDeg: -68.377, elevationM: 4620 }, startDate: "2026-01-10", nights: 6, medianSeeingArcsec: 1.4, monitor: monitorOf(campaign) });
    const upload = await postUpload(lead, campaignId, path, "quartz-later.csv");
    expect(upload.status).toBe(202);
    expect((await waitForUpload(lead, upload.body.upload.id as number)).status).toBe("done");

    const again = (await committee.get(`/api/reports/${reportId}/versions/1`)).body as ReportVersionView;
    expect(again.comparison).toEqual(v1.comparison);
    expect(again.uploads).toEqual(v1.uploads);
    expect(again.newerData).toEqual({ uploadsSince: 1 });
    // The live numbers did move: the frozen ones did not follow them.
    const live = (await lead.get(`/api/reports/${reportId}/preview`)).body as typeof v1.comparison;
    const quartzLive = live.rows.find((row) => row.label === "Quartz Shoulder")?.statistics?.samples ?? 0;
    expect(quartzLive).toBeGreaterThan(v1.comparison.rows.find((row) => row.label === "Quartz Shoulder")?.statistics?.samples ?? 0);
  });

  it("publishes version 2 that says what changed since version 1: numbers that moved and by how much, sections whose text changed", async () => {
    const results = v1.sections[0];
    await lead.patch(`/api/reports/${reportId}/sections/${results?.id}`).set(SAME_ORIGIN).send({ body: "With January's nights the margin narrows." }).expect(200);
    const v2 = (await lead.post(`/api/reports/${reportId}/versions`).set(SAME_ORIGIN).send({ note: "January data" }).expect(201)).body as ReportVersionView;
    expect(v2.number).toBe(2);
    expect(v2.changes).toMatchObject({ fromVersion: 1, toVersion: 2, uploadsAdded: 1, titleChanged: false, subjectsAdded: [], subjectsRemoved: [] });
    expect(v2.changes?.sections).toEqual([{ id: results?.id, title: "Results", change: "text" }]);
    const samples = v2.changes?.figures.find((figure) => figure.subject === "Quartz Shoulder" && figure.figure === "samples");
    const before = v1.comparison.rows.find((row) => row.label === "Quartz Shoulder")?.statistics?.samples ?? 0;
    expect(samples).toMatchObject({ before, unit: "count" });
    expect(samples?.change).toBe((samples?.after ?? 0) - before);
    expect(v2.changes?.figures.some((figure) => figure.subject === "Quartz Shoulder" && figure.figure === "median seeing (″)" && figure.change !== 0)).toBe(true);
    // Tern Ridge got no new data: none of its numbers is listed.
    expect(v2.changes?.figures.filter((figure) => figure.subject === "Tern Ridge")).toEqual([]);
    expect(v2.newerData.uploadsSince).toBe(0);
    // Version 1 is unchanged, and the comment keeps the version it was written against.
    expect(((await committee.get(`/api/reports/${reportId}/versions/1`)).body as ReportVersionView).comparison).toEqual(v1.comparison);
    const comments = (await committee.get(`/api/reports/${reportId}/comments`)).body as ReportComments;
    expect(comments.threads.find((thread) => thread.id === threadId)?.version).toBe(1);
    const detail = (await committee.get(`/api/reports/${reportId}`)).body as ReportDetail;
    expect(detail.version?.number).toBe(2);
    expect(detail.versions.map((version) => version.number)).toEqual([1, 2]);
  });
});

describe("sharing", async () => {
  const report = await newReport("Named readers only");
  const secondMember = { id: await createAccount(context, { email: "second@calmcrest.test", name: "Second Member", role: "committee", password: "a-long-password" }) };
  const recipients = (await lead.get("/api/reports/recipients")).body as { id: string }[];

  it("restricts a report to named committee members: others get 404 and no e-mail", async () => {
    expect(recipients.map((recipient) => recipient.id)).toEqual(expect.arrayContaining([committeeId, secondMember.id]));
    await lead.patch(`/api/reports/${report.id}`).set(SAME_ORIGIN).send({ share: { mode: "named", userIds: [secondMember.id] } }).expect(200);
    const notCommittee = await lead.patch(`/api/reports/${report.id}`).set(SAME_ORIGIN).send({ share: { mode: "named", userIds: [await userIdOf(context, "engineer@calmcrest.test")] } });
    expect(notCommittee.status).toBe(400);
    const before = (await outboxTo("committee@calmcrest.test")).length;
    await lead.post(`/api/reports/${report.id}/versions`).set(SAME_ORIGIN).send({}).expect(201);
    const second = request.agent(app);
    await second.post("/api/auth/sign-in").set(SAME_ORIGIN).send({ email: "second@calmcrest.test", password: "a-long-password" }).expect(200);
    expect((await second.get(`/api/reports/${report.id}`)).status).toBe(200);
    expect((await committee.get(`/api/reports/${report.id}`)).status).toBe(404);
    expect((await committee.post(`/api/reports/${report.id}/comments`).set(SAME_ORIGIN).send({ body: "hi", version: 1 })).status).toBe(404);
    expect(await outboxTo("committee@calmcrest.test")).toHaveLength(before);
    const toSecond = (await outboxTo("second@calmcrest.test")).filter((message) => message.subject.includes("Named readers only"));
    expect(toSecond.map((message) => message.kind)).toEqual(["report_published"]);
  });
});

describe("a publication and its e-mails commit together", async () => {
  it("leaves neither a version nor a message when writing the message fails", async () => {
    const report = await newReport("Doomed publication");
    const acceptInsertsAgain = await refuseInsertsInto(context, "outbox", "outbox is full");
    expectConsoleError();
    const response = await lead.post(`/api/reports/${report.id}/versions`).set(SAME_ORIGIN).send({});
    await acceptInsertsAgain();
    expect(response.status).toBe(500);
    expect(await countRows(context, "report_version", { report_id: report.id })).toBe(0);
    expect((await lead.get(`/api/reports/${report.id}`)).body.status).toBe("draft");
  });
});
