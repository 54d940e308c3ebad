import type { Knex } from "knex";
import type { User } from "lucia";
import type { MonitorSettings } from "@calmcrest/seeing-stats";
import {
  RESPONSE_SET_LABELS,
  type CampaignDetail,
  type CampaignListItem,
  type CampaignMonitor,
  type SavedMapping,
} from "@calmcrest/contracts";
import type { z } from "zod";
import type { createCampaignSchema, monitorSettingsSchema, patchCampaignSchema } from "@calmcrest/contracts";
import { roleAllows, type CampaignAction } from "../access/access.server";
import { HttpError, notFound } from "../http/errors";
import type { StoreCore } from "./core";
import { exclusionRows, exclusionView } from "./exclusions";
import { membershipsStore } from "./memberships";
import { siteRef, siteRowById } from "./sites";
import { uploadListItem, uploadRows } from "./uploads";

// Campaigns with their monitor: rows, the one row <-> monitor mapping (monitorOf for the engine, campaignMonitor
// for the contracts, monitorColumns for writes), access by role and membership, and every campaign write.

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

/** A monitor as validated by the contracts (defaults filled in). */
export type MonitorInput = z.output<typeof monitorSettingsSchema>;
type ParsedCreateCampaign = z.output<typeof createCampaignSchema>;
type ParsedPatchCampaign = z.output<typeof patchCampaignSchema>;

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

/** The contracts' monitor of a stored campaign (missing optional values are null). */
export function campaignMonitor(row: CampaignRow): CampaignMonitor {
  return {
    apertureMm: row.aperture_mm,
    baselineMm: row.baseline_mm,
    wavelengthNm: row.wavelength_nm,
    pixelScaleArcsec: row.pixel_scale_arcsec,
    exposureMs: row.exposure_ms,
    heightAboveGroundM: row.height_above_ground_m,
    response: row.response,
    responseName: RESPONSE_SET_LABELS[row.response],
  };
}

/** The campaign columns of a monitor (the one contract -> row mapping). */
export function monitorColumns(monitor: MonitorInput): Pick<
  CampaignRow,
  "aperture_mm" | "baseline_mm" | "wavelength_nm" | "pixel_scale_arcsec" | "exposure_ms" | "height_above_ground_m" | "response"
> {
  return {
    aperture_mm: monitor.apertureMm,
    baseline_mm: monitor.baselineMm,
    wavelength_nm: monitor.wavelengthNm,
    pixel_scale_arcsec: monitor.pixelScaleArcsec ?? null,
    exposure_ms: monitor.exposureMs ?? null,
    height_above_ground_m: monitor.heightAboveGroundM ?? null,
    response: monitor.response,
  };
}

export interface CampaignStats {
  sampleCount: number;
  uploadCount: number;
  firstSampleAt: string | null;
  lastSampleAt: string | null;
}

/** Sample and upload counts per campaign, from the upload records (stored samples = accepted of done uploads). */
export async function campaignStats(knex: Knex, campaignIds: readonly number[]): Promise<Map<number, CampaignStats>> {
  const stats = new Map<number, CampaignStats>();
  if (campaignIds.length === 0) return stats;
  const uploads = await knex("upload")
    .whereIn("campaign_id", campaignIds)
    .groupBy("campaign_id")
    .select<{ campaign_id: number; uploads: number; samples: number | null }[]>(
      "campaign_id",
      // Withdrawn uploads are listed but count for nothing.
      knex.raw("SUM(CASE WHEN withdrawn_at IS NULL THEN 1 ELSE 0 END) AS uploads"),
      knex.raw("SUM(CASE WHEN status = 'done' AND withdrawn_at IS NULL THEN samples_accepted ELSE 0 END) AS samples"),
    );
  for (const id of campaignIds) stats.set(id, { sampleCount: 0, uploadCount: 0, firstSampleAt: null, lastSampleAt: null });
  for (const row of uploads) {
    const entry = stats.get(row.campaign_id);
    if (entry) {
      entry.uploadCount = Number(row.uploads);
      entry.sampleCount = Number(row.samples ?? 0);
    }
  }
  for (const id of campaignIds) {
    // One MIN and one MAX on the (campaign_id, time_ms) primary key, each in its own subquery, are two index
    // look-ups. Both in one SELECT would scan every sample of the campaign (SQLite's min/max optimisation
    // applies only to a query with a single aggregate): 0.2 s for a million, on the event loop.
    const range = await knex
      .select<{ first: number | null; last: number | null }>(
        knex("sample").where({ campaign_id: id }).min("time_ms").as("first"),
        knex("sample").where({ campaign_id: id }).max("time_ms").as("last"),
      )
      .first();
    const entry = stats.get(id);
    if (entry && range) {
      entry.firstSampleAt = range.first === null ? null : new Date(range.first).toISOString();
      entry.lastSampleAt = range.last === null ? null : new Date(range.last).toISOString();
    }
  }
  return stats;
}

export function campaignListItem(row: CampaignRow, stats: CampaignStats | undefined): CampaignListItem {
  return {
    id: row.id,
    siteId: row.site_id,
    name: row.name,
    status: row.status,
    startDate: row.start_date,
    endDate: row.end_date,
    monitor: campaignMonitor(row),
    sampleCount: stats?.sampleCount ?? 0,
    uploadCount: stats?.uploadCount ?? 0,
    firstSampleAt: stats?.firstSampleAt ?? null,
    lastSampleAt: stats?.lastSampleAt ?? null,
  };
}

export function campaignRowById(knex: Knex, campaignId: number): Promise<CampaignRow | undefined> {
  return knex("campaign").where({ id: campaignId }).first<CampaignRow | undefined>();
}

export function campaignsStore(core: StoreCore) {
  const knex = () => core.knex;
  const members = membershipsStore(core);

  async function require(campaignId: number): Promise<CampaignRow> {
    const row = core.reads.campaign(campaignId);
    if (!row) throw notFound("That campaign");
    return row;
  }

  return {
    require,

    /** The campaigns with these ids, by id. */
    async listByIds(campaignIds: readonly number[]): Promise<CampaignRow[]> {
      return core.reads.campaigns(campaignIds);
    },

    /** List items (with counts) of these campaigns, by id. */
    async listItems(campaignIds: readonly number[]): Promise<CampaignListItem[]> {
      const rows = await knex()("campaign").whereIn("id", campaignIds).orderBy("id").select<CampaignRow[]>("*");
      const stats = await campaignStats(knex(), campaignIds);
      return rows.map((row) => campaignListItem(row, stats.get(row.id)));
    },

    /** The campaign's site row. */
    async siteOf(campaign: CampaignRow) {
      const site = core.reads.site(campaign.site_id);
      if (!site) throw notFound("That site");
      return site;
    },

    /**
     * The campaign, if the user may see it and do `action` there. 404 when it does not exist or is invisible to
     * the user (same answer, so ids cannot be probed); 403 when visible but the role may not do the action.
     */
    async forUser(user: User, campaignId: number, action: CampaignAction): Promise<CampaignRow> {
      const campaign = core.reads.campaign(campaignId);
      if (!campaign) throw notFound("That campaign");
      const visible = user.role === "admin" || user.role === "lead" || (user.role === "engineer" && core.reads.isMember(user.id, campaignId));
      if (!visible) throw notFound("That campaign");
      if (!roleAllows(user.role, action)) {
        throw new HttpError(403, "forbidden", `Your role (${user.role}) cannot do this in a campaign. Ask a survey lead if it needs doing.`);
      }
      return campaign;
    },

    /** `GET /api/campaigns/:id` for this user (members listed for admins and leads only). */
    async detail(user: User, campaignId: number): Promise<CampaignDetail> {
      const campaign = await require(campaignId);
      const site = await siteRowById(knex(), campaign.site_id);
      if (!site) throw notFound("That site");
      const stats = await campaignStats(knex(), [campaign.id]);
      const uploads = await uploadRows(knex()).where("upload.campaign_id", campaign.id).orderBy("upload.id");
      const exclusions = await exclusionRows(knex()).where("exclusion.campaign_id", campaign.id).orderBy("exclusion.from_ms");
      const showMembers = user.role === "admin" || user.role === "lead";
      return {
        ...campaignListItem(campaign, stats.get(campaign.id)),
        siteName: site.name,
        site: siteRef(site),
        notes: campaign.notes,
        createdAt: campaign.created_at,
        updatedAt: campaign.updated_at,
        uploads: uploads.map(uploadListItem),
        exclusions: exclusions.map(exclusionView),
        members: showMembers ? await members.list(campaign.id) : [],
        savedMapping: campaign.saved_mapping ? (JSON.parse(campaign.saved_mapping) as SavedMapping) : null,
        can: {
          upload: roleAllows(user.role, "upload"),
          exclude: roleAllows(user.role, "exclude"),
          manageMembers: roleAllows(user.role, "manageMembers"),
          edit: roleAllows(user.role, "edit"),
        },
      };
    },

    /** Creates a campaign at a site with its audit row; returns its id. */
    create(actorId: string, siteId: number, input: ParsedCreateCampaign, auditDetails: { demo?: boolean } = {}): Promise<number> {
      return core.write(async ({ trx, audit, afterCommit }) => {
        const now = new Date().toISOString();
        const [inserted] = await trx("campaign")
          .insert({
            site_id: siteId,
            name: input.name,
            ...monitorColumns(input.monitor),
            start_date: input.startDate ?? null,
            end_date: input.endDate ?? null,
            status: input.status,
            notes: input.notes ?? "",
            created_by: actorId,
            created_at: now,
            updated_at: now,
          })
          .returning<{ id: number }[]>("id");
        if (!inserted) throw new HttpError(500, "server_error", "The campaign could not be stored. Try again.");
        await audit({ userId: actorId, action: "campaign.create", targetType: "campaign", targetId: inserted.id, details: { siteId, ...input, ...auditDetails } });
        // The site list's brief is keyed by the site's campaigns.
        afterCommit(() => core.samples.briefs.clear());
        return inserted.id;
      });
    },

    /**
     * Changes a campaign. The monitor cannot change once it has uploads (409): its samples were computed with
     * the current settings, and changing them would mix two calibrations. endDate before startDate is a 400.
     */
    update(actorId: string, campaignId: number, input: ParsedPatchCampaign): Promise<void> {
      return core.write(async ({ trx, audit }) => {
        const campaign = await campaignRowById(trx, campaignId);
        if (!campaign) throw notFound("That campaign");
        const changes: Record<string, unknown> = { updated_at: new Date().toISOString() };
        if (input.monitor) {
          const upload = await trx("upload").where({ campaign_id: campaign.id }).first();
          if (upload) {
            throw new HttpError(
              409,
              "campaign_has_uploads",
              "The monitor settings cannot change once a campaign has uploads (its samples were computed with them). Create a new campaign for the new settings.",
            );
          }
          Object.assign(changes, monitorColumns(input.monitor));
        }
        if (input.name !== undefined) changes.name = input.name;
        if (input.startDate !== undefined) changes.start_date = input.startDate;
        if (input.endDate !== undefined) changes.end_date = input.endDate;
        if (input.status !== undefined) changes.status = input.status;
        if (input.notes !== undefined) changes.notes = input.notes;
        const startDate = input.startDate !== undefined ? input.startDate : campaign.start_date;
        const endDate = input.endDate !== undefined ? input.endDate : campaign.end_date;
        if (startDate && endDate && startDate > endDate) {
          throw new HttpError(400, "invalid_input", "The campaign change has invalid fields. endDate: endDate must not be before startDate.", {
            endDate: ["endDate must not be before startDate."],
          });
        }
        await trx("campaign").where({ id: campaign.id }).update(changes);
        await audit({ userId: actorId, action: "campaign.update", targetType: "campaign", targetId: campaign.id, details: { ...input } });
      });
    },

    /** Stores the column mapping the upload wizard offers next time. */
    saveMapping(actorId: string, campaignId: number, input: SavedMapping): Promise<void> {
      return core.write(async ({ trx, audit }) => {
        await trx("campaign").where({ id: campaignId }).update({ saved_mapping: JSON.stringify(input), updated_at: new Date().toISOString() });
        await audit({ userId: actorId, action: "campaign.saved_mapping", targetType: "campaign", targetId: campaignId, details: { ...input } });
      });
    },
  };
}

export type CampaignsStore = ReturnType<typeof campaignsStore>;
