import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";
import type TestAgent from "supertest/lib/agent";
import type { CampaignDetail, SiteDetail, UploadStatus } from "@calmcrest/contracts";
import { SAME_ORIGIN } from "../test-support";

type Agent = InstanceType<typeof TestAgent>;

/** The repository's data-samples/ folder (small invented logs with documented counts). */
export const DATA_SAMPLES = join(dirname(fileURLToPath(import.meta.url)), "../../../../data-samples");

/** The invented ridge the data-samples logs were generated for (data-samples/generate.ts). */
export const SAMPLES_SITE = { name: "Sample Ridge", latitude: -27.42, longitude: -70.15, elevationM: 2650 };

export async function createSiteAndCampaign(
  agent: Agent,
  monitor: Record<string, unknown> = { apertureMm: 60, baselineMm: 200, wavelengthNm: 500 },
  site: Record<string, unknown> = SAMPLES_SITE,
): Promise<{ site: SiteDetail; campaign: CampaignDetail }> {
  const siteResponse = await agent.post("/api/sites").set(SAME_ORIGIN).send(site);
  if (siteResponse.status !== 201) throw new Error(`site: ${siteResponse.status} ${JSON.stringify(siteResponse.body)}`);
  const created = siteResponse.body as SiteDetail;
  const campaignResponse = await agent.post(`/api/sites/${created.id}/campaigns`).set(SAME_ORIGIN).send({ name: "Campaign", monitor });
  if (campaignResponse.status !== 201) throw new Error(`campaign: ${campaignResponse.status} ${JSON.stringify(campaignResponse.body)}`);
  return { site: created, campaign: campaignResponse.body as CampaignDetail };
}

/** Posts a file (path or bytes) to a campaign; returns the response. */
export function postUpload(
  agent: Agent,
  campaignId: number,
  file: string | Buffer,
  fileName = "log.csv",
  mapping?: Record<string, string | null>,
  extra: { readOptions?: object; storeAnyway?: boolean } = {},
) {
  const request = agent.post(`/api/campaigns/${campaignId}/uploads`).set(SAME_ORIGIN);
  if (mapping) void request.field("mapping", JSON.stringify(mapping));
  if (extra.readOptions) void request.field("readOptions", JSON.stringify(extra.readOptions));
  if (extra.storeAnyway !== undefined) void request.field("storeAnyway", String(extra.storeAnyway));
  return typeof file === "string" ? request.attach("file", file) : request.attach("file", file, fileName);
}

/** Polls GET /api/uploads/:id until the ingest has finished one way or another. */
export async function waitForUpload(agent: Agent, uploadId: number, timeoutMs = 15_000): Promise<UploadStatus> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const response = await agent.get(`/api/uploads/${uploadId}`);
    if (response.status !== 200) throw new Error(`upload ${uploadId}: ${response.status} ${JSON.stringify(response.body)}`);
    const status = response.body as UploadStatus;
    if (status.status !== "queued" && status.status !== "ingesting") return status;
    if (Date.now() > deadline) throw new Error(`upload ${uploadId} still ${status.status} after ${timeoutMs} ms`);
    await new Promise((resolve) => setTimeout(resolve, 25));
  }
}
