import { LOG_FIELDS, RESPONSE_SETS, RESPONSE_SET_LABELS, type ResponseSet } from "@calmcrest/seeing-stats";
import { z } from "zod";
import type { UploadListItem } from "./uploads";

/**
 * Response-coefficient sets for turning image-motion variances into r0 (stored per campaign): the engine's names
 * and its one label table, so the API, the forms and the analyzer say the same.
 */
export { RESPONSE_SETS, RESPONSE_SET_LABELS };
export type ResponseSetName = ResponseSet;

export const CAMPAIGN_STATUSES = ["planned", "running", "finished"] as const;
export type CampaignStatus = (typeof CAMPAIGN_STATUSES)[number];

/**
 * Field name -> header text as written in the file (like the analyzer's `--map field=Header`). The field names
 * are the engine's LOG_FIELDS, so the server accepts exactly the fields the row reader knows.
 */
export const columnMappingSchema = z.partialRecord(
  z.enum(LOG_FIELDS, { error: "Unknown field name; use one of the native log fields (time_utc, seeing_arcsec, ...)." }),
  z.string().min(1, "A mapped header cannot be empty."),
);
export type ColumnMappingInput = z.infer<typeof columnMappingSchema>;

/**
 * The mapping sent with an upload or a preview (like the analyzer's `--map`): it overrides only the fields it
 * names (a header, or null for "this file has no such column"); every other field is matched by name. `{}`
 * overrides nothing. The upload wizard sends every field (exactMapping), so the server reads what was checked.
 */
export const mappingOverridesSchema = z.partialRecord(
  z.enum(LOG_FIELDS, { error: "Unknown field name; use one of the native log fields (time_utc, seeing_arcsec, ...)." }),
  z.string().min(1, "A mapped header cannot be empty; send null for a field the file does not have.").nullable(),
);
export type MappingOverridesInput = z.infer<typeof mappingOverridesSchema>;

const positive = (name: string, unit: string) =>
  z
    .number({ error: `${name} must be a positive number of ${unit}.` })
    .positive(`${name} must be a positive number of ${unit}.`);

/** The monitor of a campaign, as sent when creating it. */
export const monitorSettingsSchema = z
  .object({
    apertureMm: positive("apertureMm", "millimetres"),
    baselineMm: positive("baselineMm", "millimetres"),
    wavelengthNm: positive("wavelengthNm", "nanometres").max(5000, "wavelengthNm must be below 5000 nm.").default(500),
    pixelScaleArcsec: positive("pixelScaleArcsec", "arcseconds per pixel").optional(),
    exposureMs: positive("exposureMs", "milliseconds").optional(),
    /** Height of the monitor above the ground: seeing at 2 m and at 20 m above a ridge differ a lot. */
    heightAboveGroundM: z
      .number({ error: "heightAboveGroundM must be a number of metres." })
      .min(0, "heightAboveGroundM cannot be negative.")
      .max(200, "heightAboveGroundM must be below 200 m.")
      .optional(),
    response: z.enum(RESPONSE_SETS, { error: "response must be z-tilt, g-tilt or sarazin-roddier." }).default("z-tilt"),
  })
  // Two subapertures cannot overlap, so the baseline (centre to centre) must exceed the diameter.
  .refine((monitor) => monitor.baselineMm > monitor.apertureMm, {
    message: "baselineMm must be larger than apertureMm (the two subapertures cannot overlap).",
    path: ["baselineMm"],
  });
export type MonitorSettingsInput = z.input<typeof monitorSettingsSchema>;

const isoDate = z.string().regex(/^\d{4}-\d{2}-\d{2}$/, "Use a date like 2026-03-01.");

/** Body of `POST /api/sites/:id/campaigns`. */
export const createCampaignSchema = z
  .object({
    name: z.string().trim().min(1, "Give the campaign a name.").max(120, "Keep the campaign name under 120 characters."),
    monitor: monitorSettingsSchema,
    startDate: isoDate.optional(),
    endDate: isoDate.optional(),
    status: z.enum(CAMPAIGN_STATUSES).default("running"),
    notes: z.string().max(5000).optional(),
  })
  .refine((value) => !value.startDate || !value.endDate || value.startDate <= value.endDate, {
    message: "endDate must not be before startDate.",
    path: ["endDate"],
  });
export type CreateCampaignInput = z.input<typeof createCampaignSchema>;

/**
 * Body of `PATCH /api/campaigns/:id`. `monitor` can only change while the campaign has no uploads
 * (stored samples were computed with the old settings); otherwise the server answers 409.
 */
export const patchCampaignSchema = z
  .object({
    name: z.string().trim().min(1).max(120),
    monitor: monitorSettingsSchema,
    startDate: isoDate.nullable(),
    endDate: isoDate.nullable(),
    status: z.enum(CAMPAIGN_STATUSES),
    notes: z.string().max(5000),
  })
  .partial()
  .refine((value) => Object.keys(value).length > 0, { message: "Send at least one field to change." });
export type PatchCampaignInput = z.input<typeof patchCampaignSchema>;

/** ISO 8601 date-time with an explicit zone (`Z` or an offset), or a bare date taken as 00:00 UTC. */
export const isoInstantSchema = z
  .string()
  .refine((text) => /^\d{4}-\d{2}-\d{2}([T ]\d{2}:\d{2}(:\d{2}(\.\d+)?)?(Z|[+-]\d{2}:?\d{2})?)?$/.test(text) && Number.isFinite(Date.parse(text.length === 10 ? `${text}T00:00:00Z` : text)), {
    message: "Use an ISO date or date-time, like 2026-03-01 or 2026-03-01T22:00:00Z.",
  });

/** Body of `POST /api/campaigns/:id/exclusions`: samples with from <= time < to leave every statistic. */
export const createExclusionSchema = z
  .object({
    from: isoInstantSchema,
    to: isoInstantSchema,
    reason: z.string().trim().min(1, "Say why these samples are excluded (e.g. dome maintenance).").max(500),
  })
  .refine((value) => instantMs(value.from) < instantMs(value.to), { message: "to must be after from.", path: ["to"] });
export type CreateExclusionInput = z.infer<typeof createExclusionSchema>;

/** Epoch ms of an ISO instant as accepted by isoInstantSchema (bare dates and zone-less times are UTC). */
export function instantMs(text: string): number {
  if (text.length === 10) return Date.parse(`${text}T00:00:00Z`);
  const normalised = text.replace(" ", "T");
  return Date.parse(/(Z|[+-]\d{2}:?\d{2})$/.test(normalised) ? normalised : `${normalised}Z`);
}

/** Body of `POST /api/campaigns/:id/members` (admin). */
export const addMemberSchema = z.object({ userId: z.string().min(1, "Choose a user.") });
export type AddMemberInput = z.infer<typeof addMemberSchema>;

/** Body of `PUT /api/campaigns/:id/saved-mapping`: the column mapping the upload wizard offers next time. */
export const savedMappingSchema = z.object({
  mapping: columnMappingSchema,
  /** Free-form unit notes the wizard wants back (e.g. { variance: "px2" }). */
  units: z.record(z.string(), z.string()).optional(),
});
export type SavedMapping = z.infer<typeof savedMappingSchema>;

/** A campaign's monitor as stored (defaults filled in; missing optional values are null). */
export interface CampaignMonitor {
  apertureMm: number;
  baselineMm: number;
  wavelengthNm: number;
  pixelScaleArcsec: number | null;
  exposureMs: number | null;
  heightAboveGroundM: number | null;
  response: ResponseSetName;
  /** Human-readable name of the response set, e.g. "Tokovinin 2002, Z-tilt". */
  responseName: string;
}

export interface Exclusion {
  id: number;
  campaignId: number;
  /** ISO date-times (UTC). */
  from: string;
  to: string;
  reason: string;
  createdBy: { id: string; name: string };
  createdAt: string;
}

export interface CampaignMember {
  userId: string;
  name: string;
  email: string;
  role: string;
  addedAt: string;
}

/** One campaign in a site's detail. */
export interface CampaignListItem {
  id: number;
  siteId: number;
  name: string;
  status: CampaignStatus;
  startDate: string | null;
  endDate: string | null;
  monitor: CampaignMonitor;
  /** Stored samples (before filters and exclusions). */
  sampleCount: number;
  uploadCount: number;
  /** First and last stored sample, ISO, or null with no samples. */
  firstSampleAt: string | null;
  lastSampleAt: string | null;
}

/** `GET /api/campaigns`: every campaign the caller can see, with its site's name (one request, not one per site). */
export interface VisibleCampaign extends CampaignListItem {
  siteName: string;
}

/** `GET /api/campaigns/:id`. Members are listed for admins and leads only (empty for engineers). */
export interface CampaignDetail extends CampaignListItem {
  siteName: string;
  site: { id: number; name: string; latitude: number; longitude: number; elevationM: number };
  notes: string;
  createdAt: string;
  updatedAt: string;
  uploads: UploadListItem[];
  exclusions: Exclusion[];
  members: CampaignMember[];
  savedMapping: SavedMapping | null;
  /** What the caller may do here, so screens can hide buttons that would answer 403. */
  can: { upload: boolean; exclude: boolean; manageMembers: boolean; edit: boolean };
}
