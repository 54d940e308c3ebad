import { describe, expect, it } from "vitest";
import type { OutboxList, ReportComments, ReportDetail, ReportListItem } from "@calmcrest/contracts";
import { createTestServer, signedInAgent } from "../test-support";
import { seedDemoReport } from "./demo-report";
import { seedDemoScenario } from "./demo-scenario";

// The demo report on the demo scenario at a tenth of its length.
const { app, context } = await createTestServer();
await seedDemoScenario(context, { nightsScale: 0.1 });
await seedDemoReport(context);
const committee = await signedInAgent(app, "committee");
const admin = await signedInAgent(app, "admin");

describe("the demo report", () => {
  it("is one published report with two versions that the committee can read, and version 2 says what changed", async () => {
    const list = (await committee.get("/api/reports")).body as ReportListItem[];
    expect(list).toHaveLength(1);
    expect(list[0]).toMatchObject({ title: "Three southern ridges compared", status: "published", versionCount: 2, openThreads: 0 });
    const detail = (await committee.get(`/api/reports/${list[0]?.id}`)).body as ReportDetail;
    expect(detail.versions.map((version) => version.number)).toEqual([1, 2]);
    expect(detail.version?.comparison.window).toEqual({ from: null, to: null });
    expect(detail.version?.changes?.sections.map((section) => section.title)).toEqual(["Results"]);
    expect(detail.version?.changes?.figures.length).toBeGreaterThan(0);
  });

  it("has a short resolved thread on the Results section, written against version 1", async () => {
    const reportId = ((await committee.get("/api/reports")).body as ReportListItem[])[0]?.id;
    const { threads } = (await committee.get(`/api/reports/${reportId}/comments`)).body as ReportComments;
    expect(threads).toHaveLength(1);
    expect(threads[0]).toMatchObject({ sectionTitle: "Results", version: 1, status: "resolved" });
    expect(threads[0]?.comments.map((comment) => comment.author.name)).toEqual(["Priya Halvorsen", "Tomas Reyvik"]);
  });

  it("leaves its e-mails in the outbox: two publications and the thread's messages", async () => {
    await context.mail.idle();
    const { messages } = (await admin.get("/api/outbox")).body as OutboxList;
    const kinds = (to: string) => messages.filter((message) => message.to === to).map((message) => message.kind).reverse();
    expect(kinds("committee@calmcrest.test")).toEqual(["report_published", "comment_reply", "report_published", "thread_resolved"]);
    expect(kinds("lead@calmcrest.test")).toEqual(["comment_new"]);
  });
});
