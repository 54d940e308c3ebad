import { z } from "zod";
import type { CampaignListItem } from "./campaigns";

const siteFields = {
  name: z.string().trim().min(1, "Give the site a name.").max(120, "Keep the site name under 120 characters."),
  latitude: z
    .number({ error: "latitude must be a number of degrees (north positive)." })
    .min(-90, "latitude must be between -90 and 90 degrees.")
    .max(90, "latitude must be between -90 and 90 degrees."),
  longitude: z
    .number({ error: "longitude must be a number of degrees (east positive)." })
    .min(-180, "longitude must be between -180 and 180 degrees.")
    .max(180, "longitude must be between -180 and 180 degrees."),
  elevationM: z
    .number({ error: "elevationM must be a number of metres above sea level." })
    .min(-500, "elevationM must be between -500 and 9000 metres.")
    .max(9000, "elevationM must be between -500 and 9000 metres."),
  notes: z.string().max(5000, "Keep the notes under 5000 characters.").optional(),
};

/** Body of `POST /api/sites` (admin, survey lead). */
export const createSiteSchema = z.object(siteFields);
export type CreateSiteInput = z.infer<typeof createSiteSchema>;

/** Body of `PATCH /api/sites/:id`: any subset of the fields of a new site. */
export const patchSiteSchema = z
  .object(siteFields)
  .partial()
  .refine((value) => Object.keys(value).length > 0, { message: "Send at least one field to change." });
export type PatchSiteInput = z.infer<typeof patchSiteSchema>;

/** The short seeing summary shown in site lists (zenith, 500 nm, default filters, all visible campaigns). */
export interface SiteSummaryBrief {
  samples: number;
  nights: number;
  /** Arcseconds. */
  median: number;
  p25: number;
  p75: number;
}

/** One row of `GET /api/sites`. */
export interface SiteListItem {
  id: number;
  name: string;
  latitude: number;
  longitude: number;
  elevationM: number;
  notes: string;
  /** Campaigns of this site that the caller can see. */
  campaignCount: number;
  /** Every campaign at the site, seen or not: when it is larger, the figures cover only the caller's campaigns (say so). */
  campaignCountAtSite: number;
  /** null when no accepted samples exist yet. */
  summary: SiteSummaryBrief | null;
}

/** `GET /api/sites/:id` (and the answer of POST/PATCH). */
export interface SiteDetail extends SiteListItem {
  createdAt: string;
  updatedAt: string;
  /** Only the campaigns the caller can see. */
  campaigns: CampaignListItem[];
}
