import type { Knex } from "knex";
import type { User } from "lucia";
import { readingWarnings, type ColumnMapping } from "@calmcrest/seeing-stats";
import type { ColumnMappingInput, RejectReasonName, SampleCounts, UploadListItem, UploadStatus, UploadStatusName } from "@calmcrest/contracts";
import type { CampaignAction } from "../access/access.server";
import { HttpError, notFound } from "../http/errors";
import type { StoreCore } from "./core";
import type { CampaignRow } from "./campaigns";
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
}

/** Upload rows with the uploader's name. */
export function uploadRows(knex: Knex) {
  return knex("upload").leftJoin("user", "user.id", "upload.uploaded_by").select<UploadRow[]>("upload.*", "user.name as uploader_name");
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
  };
}

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
    return uploadRows(knex()).where({ "upload.campaign_id": campaignId, "upload.sha256": sha256 }).first();
  }

  return {
    byId,
    duplicateOf,

    /** The upload, if the user may do `action` in its campaign; an upload of a campaign one cannot see does not exist for them (404). */
    /** The sha256 of every upload (lower case): the raw files the data directory must keep. */
    async storedSha256s(): Promise<Set<string>> {
      const shas = await knex()("upload").distinct("sha256").pluck<string[]>("sha256");
      return new Set(shas.map((sha) => sha.toLowerCase()));
    },

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

    /** Every rejected row of the upload in line order, read lazily (a file can have millions). */
    rejectedRows(uploadId: number): IterableIterator<[line: number, reason: string, message: string, rawLine: string]> {
      return core.db.sqlite
        .prepare("SELECT line, reason, message, raw_line FROM upload_reject WHERE upload_id = ? ORDER BY line")
        .raw()
        .iterate(uploadId) as IterableIterator<[number, string, string, string]>;
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
      input: { campaignId: number; fileName: string; sizeBytes: number; sha256: string; mapping: ColumnMapping },
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
          .update({ status: "queued", error: null, finished_at: null });
        if (changed === 0) {
          throw new HttpError(409, "not_retryable", `Only failed or interrupted uploads can be retried; this one is ${before.status}.`);
        }
        await audit({ userId: actorId, action: "upload.retry", targetType: "upload", targetId: uploadId, details: { previousStatus: before.status, previousError: before.error } });
      });
    },

    // --- The ingest queue's bookkeeping. It holds the write gate itself while these run (gated: false), and an
    // ingest's status is not a person's change (audited: false; the upload and the retry carry the audit rows).

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
        { gated: false, audited: false },
      );
    },

    /** The ingest failed (its transaction rolled back): no counts, the reason for the person who uploaded it. */
    markFailed(uploadId: number, error: string): Promise<void> {
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
        { gated: false, audited: false },
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
