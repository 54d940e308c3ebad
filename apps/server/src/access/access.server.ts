import type { User } from "lucia";
import type { Knex } from "knex";
import type { MonitorSettings } from "@calmcrest/seeing-stats";
import { HttpError, notFound } from "../http/errors";

// Who may do what with field data (sites, campaigns, uploads, summaries). Committee members are stopped earlier,
// by requireRole on the field routers (403): they will read published reports only.
//   admin:    reads every site and campaign, manages membership; does not upload or edit data.
//   lead:     reads, analyses, uploads, excludes and edits everywhere.
//   engineer: reads, uploads and excludes in the campaigns they are a member of; sees nothing else.
// A campaign or site outside one's access is answered with 404 and no data, so ids cannot be probed.

export const FIELD_ROLES = ["admin", "lead", "engineer"] as const;

export type CampaignAction = "read" | "upload" | "exclude" | "edit" | "manageMembers";

export interface CampaignRow {
  id: number;
  site_id: number;
  name: string;
  aperture_mm: number;
  baseline_mm: number;
  wavelength_nm: number;
  pixel_scale_arcsec: number | null;
  exposure_ms: number | null;
  height_above_ground_m: number | null;
  response: "z-tilt" | "g-tilt" | "sarazin-roddier";
  start_date: string | null;
  end_date: string | null;
  status: "planned" | "running" | "finished";
  notes: string;
  saved_mapping: string | null;
  created_at: string;
  updated_at: string;
}

export interface SiteRow {
  id: number;
  name: string;
  latitude: number;
  longitude: number;
  elevation_m: number;
  notes: string;
  created_at: string;
  updated_at: string;
}

/** Whether the role may do the action in a campaign it can see. */
export function roleAllows(role: User["role"], action: CampaignAction): boolean {
  switch (action) {
    case "read":
      return role === "admin" || role === "lead" || role === "engineer";
    case "upload":
    case "exclude":
      return role === "lead" || role === "engineer";
    case "edit":
      return role === "admin" || role === "lead";
    case "manageMembers":
      return role === "admin";
  }
}

/** Ids of the campaigns the user can see, or "all". */
export async function visibleCampaignIds(knex: Knex, user: User): Promise<number[] | "all"> {
  if (user.role === "admin" || user.role === "lead") return "all";
  if (user.role !== "engineer") return [];
  const rows = await knex("campaign_member").where({ user_id: user.id }).select<{ campaign_id: number }[]>("campaign_id");
  return rows.map((row) => row.campaign_id);
}

async function isMember(knex: Knex, userId: string, campaignId: number): Promise<boolean> {
  const row = await knex("campaign_member").where({ user_id: userId, campaign_id: campaignId }).first();
  return row !== undefined;
}

/**
 * The campaign, if the user may see it and do `action` there. 404 when it does not exist or is invisible to the
 * user (same answer, so ids cannot be probed); 403 when visible but the role may not do the action.
 */
export async function campaignFor(knex: Knex, user: User, campaignId: number, action: CampaignAction): Promise<CampaignRow> {
  const campaign = await knex("campaign").where({ id: campaignId }).first<CampaignRow | undefined>();
  if (!campaign) throw notFound("That campaign");
  const visible = user.role === "admin" || user.role === "lead" || (user.role === "engineer" && (await isMember(knex, user.id, campaignId)));
  if (!visible) throw notFound("That campaign");
  if (!roleAllows(user.role, action)) {
    throw new HttpError(403, "forbidden", `Your role (${user.role}) cannot do this in a campaign. Ask a survey lead if it needs doing.`);
  }
  return campaign;
}

/** The site and the ids of its campaigns the user can see; 404 if the site is invisible to the user. */
export async function siteFor(knex: Knex, user: User, siteId: number): Promise<{ site: SiteRow; campaignIds: number[] }> {
  const site = await knex("site").where({ id: siteId }).first<SiteRow | undefined>();
  if (!site) throw notFound("That site");
  const visible = await visibleCampaignIds(knex, user);
  const campaigns = await knex("campaign").where({ site_id: siteId }).orderBy("id").select<{ id: number }[]>("id");
  const campaignIds = visible === "all" ? campaigns.map((row) => row.id) : campaigns.map((row) => row.id).filter((id) => visible.includes(id));
  // An engineer sees a site only through a campaign there they belong to.
  if (visible !== "all" && campaignIds.length === 0) throw notFound("That site");
  return { site, campaignIds };
}

/** Parses a numeric route id; anything else is a 404 (no such item), not a 400. */
export function routeId(value: string | string[] | undefined, what: string): number {
  const id = Number(value);
  if (typeof value !== "string" || value === "" || !Number.isSafeInteger(id) || id <= 0) throw notFound(what);
  return id;
}

/** The engine's monitor settings of a stored campaign. */
export function monitorOf(campaign: CampaignRow): MonitorSettings {
  return {
    apertureMm: campaign.aperture_mm,
    baselineMm: campaign.baseline_mm,
    wavelengthNm: campaign.wavelength_nm,
    response: campaign.response,
    ...(campaign.pixel_scale_arcsec === null ? {} : { pixelScaleArcsec: campaign.pixel_scale_arcsec }),
    ...(campaign.exposure_ms === null ? {} : { exposureMs: campaign.exposure_ms }),
  };
}
