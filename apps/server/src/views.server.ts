import type { Knex } from "knex";
import {
  RESPONSE_SET_LABELS,
  type CampaignListItem,
  type CampaignMonitor,
  type ColumnMappingInput,
  type Exclusion,
  type SampleCounts,
  type UploadListItem,
  type UploadStatusName,
} from "@calmcrest/contracts";
import type { CampaignRow } from "./access/access.server";

// Turns database rows into the response shapes of @calmcrest/contracts (one place, so every route answers alike).

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

interface CampaignStats {
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
      knex.raw("COUNT(*) AS uploads"),
      knex.raw("SUM(CASE WHEN status = 'done' THEN samples_accepted ELSE 0 END) AS samples"),
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
    // MIN/MAX on the (campaign_id, time_ms) primary key are index look-ups, not scans.
    const range = await knex("sample").where({ campaign_id: id }).first<{ first: number | null; last: number | null }>(
      knex.raw("MIN(time_ms) AS first"),
      knex.raw("MAX(time_ms) AS last"),
    );
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

export interface UploadRow {
  id: number;
  campaign_id: number;
  file_name: string;
  size_bytes: number;
  sha256: string;
  uploaded_by: string | null;
  uploader_name: string | null;
  uploaded_at: string;
  mapping: string;
  status: UploadStatusName;
  rows_read: number;
  samples_accepted: number;
  rejected_by_reason: string;
  error: string | null;
  started_at: string | null;
  finished_at: string | null;
}

/** Upload rows with the uploader's name. */
export function uploadQuery(knex: Knex) {
  return knex("upload")
    .leftJoin("user", "user.id", "upload.uploaded_by")
    .select<UploadRow[]>("upload.*", "user.name as uploader_name");
}

export function uploadCounts(row: UploadRow): SampleCounts {
  const rejectedByReason = JSON.parse(row.rejected_by_reason) as SampleCounts["rejectedByReason"];
  return {
    read: row.rows_read,
    accepted: row.samples_accepted,
    rejected: row.rows_read - row.samples_accepted,
    rejectedByReason,
  };
}

export function uploadListItem(row: UploadRow): UploadListItem {
  return {
    id: row.id,
    campaignId: row.campaign_id,
    fileName: row.file_name,
    sizeBytes: row.size_bytes,
    sha256: row.sha256,
    uploadedBy: { id: row.uploaded_by ?? "", name: row.uploader_name ?? "(deleted user)" },
    uploadedAt: row.uploaded_at,
    mapping: JSON.parse(row.mapping) as ColumnMappingInput,
    status: row.status,
    samples: uploadCounts(row),
    error: row.error,
    finishedAt: row.finished_at,
  };
}

export interface ExclusionRow {
  id: number;
  campaign_id: number;
  from_ms: number;
  to_ms: number;
  reason: string;
  created_by: string | null;
  creator_name: string | null;
  created_at: string;
}

export function exclusionQuery(knex: Knex) {
  return knex("exclusion")
    .leftJoin("user", "user.id", "exclusion.created_by")
    .select<ExclusionRow[]>("exclusion.*", "user.name as creator_name");
}

export function exclusionView(row: ExclusionRow): Exclusion {
  return {
    id: row.id,
    campaignId: row.campaign_id,
    from: new Date(row.from_ms).toISOString(),
    to: new Date(row.to_ms).toISOString(),
    reason: row.reason,
    createdBy: { id: row.created_by ?? "", name: row.creator_name ?? "(deleted user)" },
    createdAt: row.created_at,
  };
}
