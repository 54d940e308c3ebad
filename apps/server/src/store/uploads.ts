import type { Knex } from "knex";
import type { User } from "lucia";
import { readingWarnings, type ColumnMapping, type MonitorSettings } from "@calmcrest/seeing-stats";
import type { ColumnMappingInput, ReadOptions, RejectReasonName, SampleCounts, UploadListItem, UploadStatus, UploadStatusName } from "@calmcrest/contracts";
import type { z } from "zod";
import type { monitorSettingsSchema } from "@calmcrest/contracts";
import type { CampaignAction } from "../access/access.server";
import { HttpError, notFound } from "../http/errors";
import type { StoreCore } from "./core";
import type { SampleMoveJob } from "./sample-moves";
import { campaignMonitor, monitorColumns, type CampaignRow } from "./campaigns";
import type { SiteRow } from "./sites";

// Uploads: rows, the mapping to the contracts, the upload and retry writes (race-safe), and the ingest queue's
// own bookkeeping (its worker writes the samples in its own transaction; see ingest-worker.ts).

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
  withdrawn_at: string | null;
  withdrawn_by: string | null;
  withdrawer_name: string | null;
  withdrawn_reason: string | null;
  replaces_upload_id: number | null;
  /** The newest upload that re-read this one (computed). */
  replaced_by_upload_id: number | null;
  /** JSON of the monitor columns a re-read was made with (null: the campaign's). */
  monitor_override: string | null;
  /** JSON { timeFormat, utcOffsetMinutes } (null: ISO 8601 UTC). */
  read_options: string | null;
}

/** The read options of a stored upload (ISO 8601 UTC when none were given). */
export function readOptionsOf(row: Pick<UploadRow, "read_options">): ReadOptions {
  return row.read_options ? (JSON.parse(row.read_options) as ReadOptions) : { timeFormat: "iso", utcOffsetMinutes: 0 };
}

/** The monitor columns a re-read may correct (the campaign row's names). */
export type MonitorOverride = ReturnType<typeof monitorColumns>;

/** Upload rows with the uploader's and the withdrawer's names and the re-read that replaced each. */
export function uploadRows(knex: Knex) {
  return knex("upload")
    .leftJoin("user", "user.id", "upload.uploaded_by")
    .leftJoin("user as withdrawer", "withdrawer.id", "upload.withdrawn_by")
    .select<UploadRow[]>(
      "upload.*",
      "user.name as uploader_name",
      "withdrawer.name as withdrawer_name",
      knex.raw("(SELECT MAX(later.id) FROM upload AS later WHERE later.replaces_upload_id = upload.id) AS replaced_by_upload_id"),
    );
}

/** The monitor a file is read with: its read options' wavelength, when given, in place of the monitor's. */
export function monitorForFile(monitor: MonitorSettings, readOptions: Pick<ReadOptions, "wavelengthNm"> | undefined): MonitorSettings {
  return readOptions?.wavelengthNm === undefined ? monitor : { ...monitor, wavelengthNm: readOptions.wavelengthNm };
}

/** The campaign's monitor with a re-read's corrections applied (what the ingest computes with). */
export function effectiveCampaign(campaign: CampaignRow, upload: Pick<UploadRow, "monitor_override">): CampaignRow {
  if (!upload.monitor_override) return campaign;
  return { ...campaign, ...(JSON.parse(upload.monitor_override) as MonitorOverride) };
}

export function uploadCounts(row: UploadRow): SampleCounts {
  const rejectedByReason = JSON.parse(row.rejected_by_reason) as SampleCounts["rejectedByReason"];
  return { read: row.rows_read, accepted: row.samples_accepted, rejected: row.rows_read - row.samples_accepted, rejectedByReason };
}

export function uploadListItem(row: UploadRow): UploadListItem {
  const samples = uploadCounts(row);
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
    samples,
    warnings: row.status === "done" ? readingWarnings(samples) : [],
    error: row.error,
    finishedAt: row.finished_at,
    withdrawn:
      row.withdrawn_at === null
        ? null
        : { at: row.withdrawn_at, by: { id: row.withdrawn_by ?? "", name: row.withdrawer_name ?? "(deleted user)" }, reason: row.withdrawn_reason ?? "" },
    replacesUploadId: row.replaces_upload_id,
    replacedByUploadId: row.replaced_by_upload_id,
    monitorOverride: row.monitor_override ? campaignMonitor({ ...PLACEHOLDER_CAMPAIGN, ...(JSON.parse(row.monitor_override) as MonitorOverride) }) : null,
    readOptions: readOptionsOf(row),
  };
}

/** Only the monitor columns of this placeholder are read (campaignMonitor of an override). */
const PLACEHOLDER_CAMPAIGN: CampaignRow = {
  id: 0,
  site_id: 0,
  name: "",
  aperture_mm: 0,
  baseline_mm: 0,
  wavelength_nm: 0,
  pixel_scale_arcsec: null,
  exposure_ms: null,
  height_above_ground_m: null,
  response: "z-tilt",
  start_date: null,
  end_date: null,
  status: "running",
  notes: "",
  saved_mapping: null,
  created_at: "",
  updated_at: "",
};

type MonitorInput = z.output<typeof monitorSettingsSchema>;

/** Counts of rows rejected at ingest (they have no usable time, so they only join summaries without a time range). */
export interface IngestRejections {
  rejected: number;
  rejectedByReason: Record<string, number>;
}

/** The statuses a retry may start from. */
export const RETRYABLE_STATUSES = ["failed", "interrupted"] as const satisfies readonly UploadStatusName[];

const LISTED_REJECTED_ROWS = 100;

/** better-sqlite3's code for a UNIQUE constraint violation. */
function isUniqueViolation(error: unknown): boolean {
  return typeof error === "object" && error !== null && "code" in error && error.code === "SQLITE_CONSTRAINT_UNIQUE";
}

export type RecordResult = { kind: "queued"; uploadId: number } | { kind: "duplicate"; existing: UploadRow };

export function uploadsStore(core: StoreCore, access: { campaignForUser(user: User, campaignId: number, action: CampaignAction): Promise<CampaignRow> }) {
  const knex = () => core.knex;

  async function byId(uploadId: number): Promise<UploadRow | undefined> {
    return uploadRows(knex()).where("upload.id", uploadId).first();
  }

  async function duplicateOf(campaignId: number, sha256: string): Promise<UploadRow | undefined> {
    return uploadRows(knex()).where({ "upload.campaign_id": campaignId, "upload.sha256": sha256 })
      // The one that holds those bytes now: the active upload, else the newest re-read.
      .orderByRaw("upload.withdrawn_at IS NULL DESC, upload.id DESC")
      .first();
  }

  /** Who may withdraw, restore or re-read: a survey lead, or the engineer who sent the file (both within campaigns they may upload to). */
  function requireOwnerOrLead(user: User, row: UploadRow, verb: string): void {
    if (user.role === "engineer" && row.uploaded_by !== user.id) {
      throw new HttpError(403, "forbidden", `Only the engineer who sent this file or a survey lead can ${verb} it. Ask ${row.uploader_name ?? "a survey lead"}.`);
    }
  }

  /** Runs a withdrawal, restore or re-read in the ingest worker (StoreCore.moveSamples); a refusal becomes its HTTP answer. */
  async function move(job: SampleMoveJob): Promise<number | null> {
    const outcome = await core.moveSamples(job);
    if (!outcome.ok) throw new HttpError(outcome.status, outcome.code, outcome.message);
    return outcome.newUploadId;
  }

  return {
    byId,
    duplicateOf,

    /** The sha256 of every upload (lower case): the raw files the data directory must keep. */
    async storedSha256s(): Promise<Set<string>> {
      const shas = await knex()("upload").distinct("sha256").pluck<string[]>("sha256");
      return new Set(shas.map((sha) => sha.toLowerCase()));
    },

    /** The upload, if the user may do `action` in its campaign; an upload of a campaign one cannot see does not exist for them (404). */
    async forUser(user: User, uploadId: number, action: CampaignAction): Promise<UploadRow> {
      const row = await byId(uploadId);
      if (!row) throw notFound("That upload");
      try {
        await access.campaignForUser(user, row.campaign_id, action);
      } catch (error) {
        if (error instanceof HttpError && error.status === 404) throw notFound("That upload");
        throw error;
      }
      return row;
    },

    /** The status answer: the list item, the first rejected rows and the ingest's progress (0..1). */
    async status(row: UploadRow, runningProgress: number | undefined): Promise<UploadStatus> {
      const rejectedRows = await knex()("upload_reject")
        .where({ upload_id: row.id })
        .orderBy("line")
        .limit(LISTED_REJECTED_ROWS)
        .select<{ line: number; reason: RejectReasonName; message: string }[]>("line", "reason", "message");
      const progress = row.status === "done" ? 1 : (runningProgress ?? 0);
      return { ...uploadListItem(row), progress, rejectedRows, startedAt: row.started_at };
    },

    /**
     * The upload's rejected rows after line `afterLine`, in line order, at most `limit` of them: a file can have
     * millions, so a download reads them a batch at a time (one short indexed query each) and lets the event
     * loop serve others in between.
     */
    rejectedRowsAfter(uploadId: number, afterLine: number, limit: number): [line: number, reason: string, message: string, rawLine: string][] {
      return core.db.sqlite
        .prepare("SELECT line, reason, message, raw_line FROM upload_reject WHERE upload_id = ? AND line > ? ORDER BY line LIMIT ?")
        .raw()
        .all(uploadId, afterLine, limit) as [number, string, string, string][];
    },

    /** Rows rejected at ingest by the campaigns' finished uploads, by reason. */
    /** The finished uploads of these campaigns (their samples are the ones summaries use), by campaign and id. */
    async doneOf(campaignIds: readonly number[]): Promise<{ id: number; campaignId: number; fileName: string; sha256: string; samplesAccepted: number }[]> {
      const rows = await knex()("upload")
        .whereIn("campaign_id", campaignIds)
        .andWhere({ status: "done" })
        .orderBy([{ column: "campaign_id" }, { column: "id" }])
        .select<{ id: number; campaign_id: number; file_name: string; sha256: string; samples_accepted: number }[]>("id", "campaign_id", "file_name", "sha256", "samples_accepted");
      return rows.map((row) => ({ id: row.id, campaignId: row.campaign_id, fileName: row.file_name, sha256: row.sha256, samplesAccepted: row.samples_accepted }));
    },

    async ingestRejections(campaignIds: readonly number[]): Promise<IngestRejections> {
      const rows = await knex()("upload")
        .whereIn("campaign_id", campaignIds)
        .andWhere({ status: "done" })
        .whereNull("withdrawn_at")
        .select<{ rows_read: number; samples_accepted: number; rejected_by_reason: string }[]>("rows_read", "samples_accepted", "rejected_by_reason");
      const rejectedByReason: Record<string, number> = {};
      let rejected = 0;
      for (const row of rows) {
        rejected += row.rows_read - row.samples_accepted;
        for (const [reason, count] of Object.entries(JSON.parse(row.rejected_by_reason) as Record<string, number>)) {
          rejectedByReason[reason] = (rejectedByReason[reason] ?? 0) + count;
        }
      }
      return { rejected, rejectedByReason };
    },

    /**
     * Records a stored raw file as a queued upload with its audit row. The same bytes in the same campaign are
     * one upload: when another request recorded them first (even a moment ago, in a race), the UNIQUE
     * (campaign, sha256) constraint refuses this one and the answer is the existing upload.
     */
    async record(
      actorId: string,
      input: { campaignId: number; fileName: string; sizeBytes: number; sha256: string; mapping: ColumnMapping; readOptions?: ReadOptions | undefined },
    ): Promise<RecordResult> {
      try {
        const uploadId = await core.write(async ({ trx, audit }) => {
          const [inserted] = await trx("upload")
            .insert({
              campaign_id: input.campaignId,
              file_name: input.fileName,
              size_bytes: input.sizeBytes,
              sha256: input.sha256,
              uploaded_by: actorId,
              uploaded_at: new Date().toISOString(),
              mapping: JSON.stringify(input.mapping),
              read_options: input.readOptions ? JSON.stringify(input.readOptions) : null,
              status: "queued",
            })
            .returning<{ id: number }[]>("id");
          if (!inserted) throw new HttpError(500, "server_error", "The upload could not be recorded. Try again.");
          await audit({
            userId: actorId,
            action: "upload.create",
            targetType: "upload",
            targetId: inserted.id,
            details: { campaignId: input.campaignId, fileName: input.fileName, sizeBytes: input.sizeBytes, sha256: input.sha256 },
          });
          return inserted.id;
        });
        return { kind: "queued", uploadId };
      } catch (error) {
        if (!isUniqueViolation(error)) throw error;
        const existing = await duplicateOf(input.campaignId, input.sha256);
        if (!existing) throw error;
        return { kind: "duplicate", existing };
      }
    },

    /**
     * Puts a failed or interrupted upload back in the queue. Idempotent under races: the status changes only
     * `WHERE status IN (failed, interrupted)`, so of two retries at once exactly one changes the row; the other
     * is refused with 409 and nothing is ingested twice.
     */
    requeue(actorId: string, uploadId: number): Promise<void> {
      return core.write(async ({ trx, audit }) => {
        const before = await trx("upload").where({ id: uploadId }).first<{ status: UploadStatusName; error: string | null } | undefined>("status", "error");
        if (!before) throw notFound("That upload");
        const changed = await trx("upload")
          .where({ id: uploadId })
          .whereIn("status", RETRYABLE_STATUSES)
          .whereNull("withdrawn_at")
          .update({ status: "queued", error: null, finished_at: null });
        if (changed === 0) {
          if (before.status !== "done" && (await trx("upload").where({ id: uploadId }).whereNotNull("withdrawn_at").first())) {
            throw new HttpError(409, "not_retryable", "This upload is withdrawn; restore it first, or re-read it with a corrected mapping.");
          }
          throw new HttpError(409, "not_retryable", `Only failed or interrupted uploads can be retried; this one is ${before.status}.`);
        }
        await audit({ userId: actorId, action: "upload.retry", targetType: "upload", targetId: uploadId, details: { previousStatus: before.status, previousError: before.error } });
      });
    },

    /**
     * Withdraws an upload: its samples leave every statistic (moved aside, not deleted), the raw file stays, and the
     * audit row says who and why. A lead may withdraw any upload they can see; an engineer only their own.
     */
    async withdraw(user: User, row: UploadRow, reason: string): Promise<void> {
      requireOwnerOrLead(user, row, "withdraw");
      await move({ kind: "withdraw", uploadId: row.id, campaignId: row.campaign_id, actorId: user.id, reason });
    },

    /**
     * Restores a withdrawn upload: its samples count again, exactly as before. Refused (409) when another upload now
     * holds some of the same times (a re-read of the same file, typically): withdraw that one first.
     */
    async restore(user: User, row: UploadRow, reason: string | undefined): Promise<void> {
      requireOwnerOrLead(user, row, "restore");
      await move({ kind: "restore", uploadId: row.id, campaignId: row.campaign_id, actorId: user.id, reason: reason ?? null });
    },

    /**
     * Reads an upload's stored raw file again with a corrected mapping and/or monitor: a new upload row linked to the
     * old one is queued, and the old one is withdrawn in the same transaction (unless it is withdrawn already).
     * Returns the new upload's id; the caller queues its ingest.
     */
    async reread(user: User, row: UploadRow, input: { mapping: ColumnMapping; monitor: MonitorInput | undefined; reason: string; readOptions?: ReadOptions | undefined }): Promise<number> {
      requireOwnerOrLead(user, row, "re-read");
      const newId = await move({
        kind: "reread",
        uploadId: row.id,
        campaignId: row.campaign_id,
        actorId: user.id,
        reason: input.reason,
        newUpload: {
          file_name: row.file_name,
          size_bytes: row.size_bytes,
          sha256: row.sha256,
          mapping: JSON.stringify(input.mapping),
          monitor_override: input.monitor ? JSON.stringify(monitorColumns(input.monitor)) : row.monitor_override,
          read_options: input.readOptions ? JSON.stringify(input.readOptions) : row.read_options,
        },
        mapping: input.mapping,
        monitor: input.monitor ?? null,
      });
      if (newId === null) throw new HttpError(500, "server_error", "The re-read could not be recorded. Try again.");
      return newId;
    },

    // --- The ingest queue's bookkeeping. Its writes wait for the write gate like any other (a sample move may hold
    // SQLite's write lock on the worker's connection), except a failure reported while the ingest's own commit holds
    // the gate; an ingest's status is not a person's change (audited: false; the upload and the retry carry the audit rows).

    /** What the worker needs for an upload: the upload, its campaign and site. */
    async jobInput(uploadId: number): Promise<{ upload: UploadRow; campaign: CampaignRow; site: SiteRow } | null> {
      const upload = await byId(uploadId);
      if (!upload) return null;
      const campaign = await knex()("campaign").where({ id: upload.campaign_id }).first<CampaignRow | undefined>();
      const site = campaign ? await knex()("site").where({ id: campaign.site_id }).first<SiteRow | undefined>() : undefined;
      if (!campaign || !site) return null;
      return { upload, campaign, site };
    },

    markIngesting(uploadId: number): Promise<void> {
      return core.write(
        async ({ trx }) => {
          await trx("upload").where({ id: uploadId }).update({ status: "ingesting", started_at: new Date().toISOString(), error: null, finished_at: null });
        },
        { audited: false },
      );
    },

    /** The ingest failed (its transaction rolled back): no counts, the reason for the person who uploaded it. */
    markFailed(uploadId: number, error: string, options: { holdsGate: boolean }): Promise<void> {
      return core.write(
        async ({ trx }) => {
          await trx("upload").where({ id: uploadId }).update({
            status: "failed",
            error,
            rows_read: 0,
            samples_accepted: 0,
            rejected_by_reason: "{}",
            finished_at: new Date().toISOString(),
          });
        },
        { gated: !options.holdsGate, audited: false },
      );
    },

    /** The worker committed an upload's samples: drop the campaign's cached columns and tell the change listeners. */
    ingestCommitted(uploadId: number, campaignId: number): void {
      core.committedElsewhere(
        { userId: null, action: "upload.ingested", targetType: "upload", targetId: uploadId, details: { campaignId }, at: new Date().toISOString() },
        () => core.samples.invalidate(campaignId),
      );
    },

    /**
     * Start-up recovery: an upload left `ingesting` belonged to a process that died mid-ingest. Its samples cannot
     * exist (one transaction), so it is marked `interrupted` for a person to retry. Returns those still `queued`.
     */
    async recoverAtStartup(): Promise<{ interrupted: number; queuedIds: number[] }> {
      const interrupted = await core.write(
        async ({ trx }) =>
          trx("upload")
            .where({ status: "ingesting" })
            .update({ status: "interrupted", error: "The server stopped while this file was being ingested; nothing of it was stored. Retry it.", finished_at: new Date().toISOString() }),
        { audited: false },
      );
      const queued = await knex()("upload").where({ status: "queued" }).orderBy("id").select<{ id: number }[]>("id");
      return { interrupted, queuedIds: queued.map((row) => row.id) };
    },
  };
}

export type UploadsStore = ReturnType<typeof uploadsStore>;
