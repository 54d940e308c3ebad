import type { User } from "lucia";
import { RESPONSE_SET_NAMES } from "@calmcrest/seeing-stats";
import type { ComparedCampaign, ComparisonQuery, ComparisonResponse } from "@calmcrest/contracts";
import type { AppContext } from "../context";
import { HttpError } from "../http/errors";
import { campaignMonitor, siteRef, type CampaignRow, type SiteRow } from "../store/index";
import { mergeComparisonParts, type ComparisonRowInput, type PairFigures } from "./comparison";
import type { SummaryAnswer } from "./summary-service.server";

// GET /api/comparisons on the main thread: access to every site or campaign, the rows' campaigns, uploads and
// exclusion windows from the store; the computation itself is the "comparison" task of the summary service
// (comparison.ts in a worker thread, its answer cached under the campaigns' data versions).

/** A row's campaigns as the response names them, with their finished uploads and exclusion windows. */
async function comparedCampaigns(
  context: AppContext,
  campaigns: CampaignRow[],
  uploads: Awaited<ReturnType<AppContext["store"]["uploads"]["doneOf"]>>,
): Promise<ComparedCampaign[]> {
  return Promise.all(
    campaigns.map(async (campaign) => {
      const monitor = campaignMonitor(campaign);
      const exclusions = await context.store.exclusions.listForCampaign(campaign.id);
      return {
        id: campaign.id,
        name: campaign.name,
        heightAboveGroundM: monitor.heightAboveGroundM,
        response: monitor.response,
        responseName: RESPONSE_SET_NAMES[monitor.response],
        apertureMm: monitor.apertureMm,
        baselineMm: monitor.baselineMm,
        wavelengthNm: monitor.wavelengthNm,
        pixelScaleArcsec: monitor.pixelScaleArcsec,
        exposureMs: monitor.exposureMs,
        uploads: uploads.filter((upload) => upload.campaignId === campaign.id).map(({ id, fileName, sha256, samplesAccepted }) => ({ id, fileName, sha256, samplesAccepted })),
        exclusions: exclusions.map((window) => ({ from: window.from, to: window.to, reason: window.reason })),
      };
    }),
  );
}

/** A 400 naming the parameter for an id that does not exist (for a caller who can see every site and campaign). */
function unknownId(parameter: "sites" | "campaigns", id: number): HttpError {
  const what = parameter === "sites" ? "site" : "campaign";
  const message = `${parameter}: there is no ${what} with id ${id}. Choose the ${parameter} to compare from the list on the Compare page.`;
  return new HttpError(400, "invalid_input", `The comparison query has invalid fields. ${message}`, { [parameter]: [message] });
}

/**
 * Loads one id's row, with the same access as the site and campaign pages: an item outside the caller's access is a
 * 404 (the same answer as for one that does not exist, so ids cannot be probed). A caller who sees everything (lead,
 * admin) gets a 400 naming the parameter for an id that does not exist, since for them nothing is hidden.
 */
async function orUnknown<T>(user: User, parameter: "sites" | "campaigns", id: number, load: () => Promise<T>): Promise<T> {
  try {
    return await load();
  } catch (thrown) {
    if (thrown instanceof HttpError && thrown.status === 404 && (user.role === "lead" || user.role === "admin")) throw unknownId(parameter, id);
    throw thrown;
  }
}

/**
 * `GET /api/comparisons` for this user, as the summary service's cached answer (UTF-8 JSON and its ETag): checks access to every site or campaign, reads the rows'
 * campaigns, uploads and exclusion windows, and has the summary service compute the comparison (or answer it from
 * its cache while the campaigns' data is unchanged).
 */
export async function compareForUserAnswer(context: AppContext, user: User, query: ComparisonQuery): Promise<SummaryAnswer> {
  const { store, summaries } = context;
  const kind: ComparisonResponse["kind"] = query.campaigns === undefined ? "sites" : "campaigns";
  const rowsToLoad: { key: string; label: string; site: SiteRow; campaignId: number | null; campaignIds: number[] }[] = [];
  if (query.campaigns !== undefined) {
    for (const campaignId of query.campaigns) {
      const campaign = await orUnknown(user, "campaigns", campaignId, () => store.campaigns.forUser(user, campaignId, "read"));
      const site = await store.sites.require(campaign.site_id);
      rowsToLoad.push({ key: `campaign:${campaign.id}`, label: `${site.name} — ${campaign.name}`, site, campaignId: campaign.id, campaignIds: [campaign.id] });
    }
  } else {
    for (const siteId of query.sites ?? []) {
      const { site, campaignIds } = await orUnknown(user, "sites", siteId, () => store.sites.forUser(user, siteId));
      rowsToLoad.push({ key: `site:${site.id}`, label: site.name, site, campaignId: null, campaignIds });
    }
  }
  const allCampaignIds = rowsToLoad.flatMap((row) => row.campaignIds);
  const campaignRows = await store.campaigns.listByIds(allCampaignIds);
  const uploads = await store.uploads.doneOf(allCampaignIds);
  const rows: ComparisonRowInput[] = [];
  for (const row of rowsToLoad) {
    rows.push({
      key: row.key,
      label: row.label,
      site: siteRef(row.site),
      campaignId: row.campaignId,
      campaignIds: row.campaignIds,
      campaigns: await comparedCampaigns(context, campaignRows.filter((campaign) => row.campaignIds.includes(campaign.id)), uploads),
    });
  }
  // The rows as this caller sees them (their campaigns, uploads, exclusions) and the query are the key; the
  // service adds the campaigns' data versions, so no answer outlives its samples.
  const { sites: _sites, campaigns: _campaigns, ...settings } = query;
  return summaries.compute("comparison", {
    campaignIds: allCampaignIds,
    key: JSON.stringify({ kind, rows, settings }),
    input: () => ({ kind, rows, query }),
    // With two workers: the rows' summaries on one and the pairs on the other, at the same time (the same answer).
    split: {
      parts: (input) => [{ ...input, part: "rows" }, { ...input, part: "pairs" }],
      merge: ([rowsBody, pairsBody]) =>
        Buffer.from(JSON.stringify(mergeComparisonParts(JSON.parse(String(rowsBody)) as ComparisonResponse, JSON.parse(String(pairsBody)) as PairFigures[]))),
    },
  });
}

/** The comparison as an object, for other code (a report freezes it into a version). */
export async function compareForUser(context: AppContext, user: User, query: ComparisonQuery): Promise<ComparisonResponse> {
  return JSON.parse((await compareForUserAnswer(context, user, query)).body.toString("utf8")) as ComparisonResponse;
}
