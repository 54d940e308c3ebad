import type { User } from "lucia";
import { comparisonQuerySchema } from "@calmcrest/contracts";
import type { AppContext } from "../context";
import { compareForUser } from "../summaries/compare.server";

// The demo report: one published report with two versions and a short comment thread, so a newcomer sees the
// report loop at once (and the outbox holds its e-mails). Invented people, invented ridges, invented words.

async function demoUser(context: AppContext, email: string): Promise<User> {
  const id = await context.store.users.idByEmail(email);
  const row = id ? await context.store.users.byId(id) : undefined;
  if (!row) throw new Error(`The demo user ${email} is missing; the demo users are seeded first.`);
  return { id: row.id, email: row.email, name: row.name, role: row.role, status: row.status };
}

const SECTIONS = {
  method: [
    "Each ridge was measured with a differential image-motion monitor (60 mm subapertures on a 200 mm baseline).",
    "All seeing values are reduced **to zenith and 500 nm**; samples taken with the sun above −18° or beyond 60° from zenith are left out.",
    "",
    "- Response coefficients as named in the table (Quartz Shoulder uses Sarazin & Roddier).",
    "- Intervals are 95 % whole-night bootstrap intervals.",
  ].join("\n"),
  resultsV1: "Through the end of August, **Quartz Shoulder** has the sharpest median seeing of the three ridges, with Tern Ridge second. Saltpan Crest trails both in every month it was observed.",
  resultsV2: "With the spring months added, **Quartz Shoulder** stays the sharpest ridge; its margin over Tern Ridge narrows slightly. Saltpan Crest still trails in every month.",
  caveats: [
    "Tern Ridge pools a mast and a low tower at different heights above ground; the tower sees more ground-layer turbulence.",
    "The campaigns did not all run over the same months, so the season-balanced medians are the fairer figures.",
  ].join("\n\n"),
  recommendation: "Keep the monitors running through one full winter before the committee chooses between **Quartz Shoulder** and **Tern Ridge**.",
};

export async function seedDemoReport(context: AppContext): Promise<void> {
  const { store } = context;
  const lead = await demoUser(context, "lead@calmcrest.test");
  const committee = await demoUser(context, "committee@calmcrest.test");
  const sites = await store.sites.listVisible(lead);
  const idOf = (name: string) => sites.find((entry) => entry.site.name === name)?.site.id;
  const ids = ["Quartz Shoulder", "Tern Ridge", "Saltpan Crest"].map(idOf).filter((id): id is number => id !== undefined);
  if (ids.length < 2) return;

  const firstSettings = { sites: ids.join(","), to: "2025-08-31" };
  const reportId = await store.reports.create(lead, {
    title: "Three southern ridges compared",
    summary: "Where the survey stands on the three ridges with the longest campaigns, for the committee's first reading.",
    comparison: firstSettings,
    sections: [
      { title: "Method", body: SECTIONS.method },
      { title: "Results", body: SECTIONS.resultsV1 },
      { title: "Caveats", body: SECTIONS.caveats },
      { title: "Recommendation", body: SECTIONS.recommendation },
    ],
  });
  const publish = async (settings: Record<string, string>, note: string) =>
    store.reports.publish(lead, reportId, await compareForUser(context, lead, comparisonQuerySchema.parse(settings)), settings, note);

  await publish(firstSettings, "First reading: campaigns through August 2025.");
  const detail = await store.reports.detail(lead, reportId);
  const results = detail.draft?.sections.find((section) => section.title === "Results");
  const threadId = await store.reports.addComment(committee, reportId, {
    body: "Is the margin between Quartz Shoulder and Tern Ridge larger than the *season* effect? Most of Tern Ridge's tower nights are in the southern spring.",
    version: 1,
    sectionId: results?.id ?? null,
    parentId: null,
  });
  await store.reports.addComment(lead, reportId, {
    body: "Fair point. Version 2 adds September to November, and the table now shows the season-balanced medians beside the plain ones.",
    version: 1,
    sectionId: null,
    parentId: threadId,
  });

  const secondSettings = { sites: ids.join(",") };
  await store.reports.update(lead, reportId, { comparison: secondSettings });
  if (results) await store.reports.patchSection(lead, reportId, results.id, { body: SECTIONS.resultsV2 });
  await publish(secondSettings, "Adds the spring months (September to November 2025).");
  await store.reports.patchComment(lead, threadId, { action: "resolve" });
}
