import { access } from "node:fs/promises";
import type { RequestHandler } from "express";
import multer from "multer";
import { describeLogFormatError, LogFormatError, previewLog, SeeingInputError, type MappingOverrides } from "@calmcrest/seeing-stats";
import { mappingOverridesSchema, spreadsheetSafeCsv, type UploadAccepted, type UploadDuplicateBody, type UploadPreview } from "@calmcrest/contracts";
import type { AppContext } from "../context";
import { FIELD_ROLES, routeId, type CampaignAction } from "../access/access.server";
import { HttpError, notFound, parseOr400 } from "../http/errors";
import { ApiRouter } from "../http/route-table";
import { currentUser } from "../http/session";
import { monitorOf, siteLocationOf, uploadListItem, type CampaignRow } from "../store/index";
import { acceptUpload } from "../uploads/accept-upload.server";
import { discardTemporary, hashingDiskStorage, rawFilePath, type HashedFile } from "../uploads/raw-files.server";

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace Express {
    interface Locals {
      /** Set by campaignAccess before multer runs. */
      campaign?: CampaignRow;
    }
  }
}

/** The preview reads only the first rows; the wizard sends a small slice of the file. */
const PREVIEW_MAX_BYTES = 4 * 1024 * 1024;

function accessedCampaign(locals: Express.Locals): CampaignRow {
  if (!locals.campaign) throw notFound("That campaign");
  return locals.campaign;
}

/**
 * The multipart `mapping` field: JSON field -> header (or null: not in the file), overriding only the fields it
 * names; absent or `{}`, every field is matched by name.
 */
function parseMappingField(value: unknown): MappingOverrides | undefined {
  if (value === undefined || value === "") return undefined;
  if (typeof value !== "string") throw new HttpError(400, "invalid_input", "The mapping must be one JSON text field.", { mapping: ["Send one mapping field."] });
  let parsed: unknown;
  try {
    parsed = JSON.parse(value);
  } catch {
    throw new HttpError(400, "invalid_input", 'The mapping is not valid JSON. Send it like {"time_utc":"Timestamp","seeing_arcsec":"FWHM"}.', {
      mapping: ["Not valid JSON."],
    });
  }
  return parseOr400(mappingOverridesSchema, parsed, "The mapping");
}

/** Runs a multer middleware and turns its errors into the API's JSON errors (413 names the limit in MB). */
function withUploadErrors(middleware: RequestHandler, limitMb: number): RequestHandler {
  return (req, res, next) => {
    middleware(req, res, (error?: unknown) => {
      if (!error) return next();
      if (error instanceof multer.MulterError) {
        if (error.code === "LIMIT_FILE_SIZE") {
          return next(
            new HttpError(413, "file_too_large", `The file is larger than the upload limit of ${limitMb} MB. Split the log into smaller files (for example one per month) and upload each.`),
          );
        }
        return next(new HttpError(400, "bad_upload", `The upload form was not understood (${error.message}). Send one file in the field "file".`));
      }
      next(error);
    });
  };
}

/**
 * /api/campaigns/:id/uploads: the wizard's preview and receiving a log. The campaign is checked (guard, then
 * membership and role) before multer reads a byte.
 */
export function campaignUploadRoutes(context: AppContext): ApiRouter {
  const { env, store } = context;
  const routes = new ApiRouter("/campaigns/:id/uploads");

  const limitMb = env.CALMCREST_MAX_UPLOAD_MB;
  const receiveFile = withUploadErrors(
    multer({ storage: hashingDiskStorage(env.dataDir), limits: { fileSize: env.maxUploadBytes, files: 1, fields: 10 } }).single("file"),
    limitMb,
  );
  const receivePreview = withUploadErrors(
    multer({ storage: multer.memoryStorage(), limits: { fileSize: PREVIEW_MAX_BYTES, files: 1, fields: 10 } }).single("file"),
    PREVIEW_MAX_BYTES / 1024 / 1024,
  );

  /** Checks access before multer reads a byte, and keeps the campaign for the handler. */
  const campaignAccess =
    (action: CampaignAction): RequestHandler =>
    async (req, res, next) => {
      res.locals.campaign = await store.campaigns.forUser(currentUser(res.locals), routeId(req.params.id, "That campaign"), action);
      next();
    };

  routes.route("POST", "/preview", { access: FIELD_ROLES, campaignAction: "upload" }, campaignAccess("upload"), receivePreview, async (req, res) => {
    const campaign = accessedCampaign(res.locals);
    const body = req.body as Record<string, unknown> | undefined;
    const text = req.file ? req.file.buffer.toString("utf8") : typeof body?.text === "string" ? body.text : null;
    if (text === null) throw new HttpError(400, "invalid_input", 'Send the first rows of the log as the file field "file".', { file: ["No file was sent."] });
    const mapping = parseMappingField(body?.mapping);
    const site = await store.campaigns.siteOf(campaign);
    try {
      const preview = previewLog(text, {
        monitor: monitorOf(campaign),
        site: siteLocationOf(site),
        maxRows: 20,
        ...(mapping ? { mapping } : {}),
      });
      const answer: UploadPreview = {
        delimiter: preview.delimiter,
        headers: preview.headers,
        // The proposal is always from the headers alone, so the wizard can offer it even when a mapping was sent.
        proposedMapping: mapping ? previewLog(text, { monitor: monitorOf(campaign), maxRows: 0 }).proposedMapping : preview.proposedMapping,
        mappingProblems: preview.mappingProblems,
        // The overrides sent, with every other field matched by name: what an upload would read.
        mappingUsed: preview.proposedMapping,
        rows: preview.rows,
      };
      res.json(answer);
    } catch (error) {
      if (error instanceof LogFormatError) throw new HttpError(400, "unreadable_log", describeLogFormatError(error).text);
      if (error instanceof SeeingInputError) throw new HttpError(400, "invalid_input", error.message);
      throw error;
    }
  });

  routes.route("POST", "/", { access: FIELD_ROLES, campaignAction: "upload" }, campaignAccess("upload"), receiveFile, async (req, res) => {
    const user = currentUser(res.locals);
    const campaign = accessedCampaign(res.locals);
    const file = req.file as (Express.Multer.File & HashedFile) | undefined;
    if (!file) throw new HttpError(400, "invalid_input", 'Send the log as the file field "file".', { file: ["No file was sent."] });
    let mapping: MappingOverrides | undefined;
    try {
      mapping = parseMappingField((req.body as Record<string, unknown> | undefined)?.mapping);
    } catch (error) {
      await discardTemporary(file);
      throw error;
    }
    const result = await acceptUpload(context, { campaign, userId: user.id, file, fileName: file.originalname, mapping });
    if (result.kind === "duplicate") {
      const { existing } = result;
      const duplicate: UploadDuplicateBody = {
        error: {
          code: "duplicate_upload",
          message: `This file was uploaded to this campaign already (${existing.file_name}, ${existing.uploaded_at}); its samples are counted once.`,
        },
        upload: uploadListItem(existing),
      };
      res.status(409).json(duplicate);
      return;
    }
    const accepted: UploadAccepted = { upload: { id: result.uploadId, status: "queued" } };
    res.status(202).json(accepted);
  });

  return routes;
}

/** /api/uploads/:id: an upload's status, its rejected rows, and a retry. */
export function uploadRoutes(context: AppContext): ApiRouter {
  const { env, ingest, store } = context;
  const routes = new ApiRouter("/uploads");
  const uploadId = (value: string | string[] | undefined) => routeId(value, "That upload");

  routes.route("GET", "/:id", { access: FIELD_ROLES, campaignAction: "read" }, async (req, res) => {
    const row = await store.uploads.forUser(currentUser(res.locals), uploadId(req.params.id), "read");
    res.json(await store.uploads.status(row, ingest.progress(row.id)));
  });

  routes.route("GET", "/:id/rejected.csv", { access: FIELD_ROLES, campaignAction: "read" }, async (req, res) => {
    const row = await store.uploads.forUser(currentUser(res.locals), uploadId(req.params.id), "read");
    res.setHeader("Content-Type", "text/csv; charset=utf-8");
    const safeName = row.file_name.replace(/[^\w.-]+/g, "_");
    res.setHeader("Content-Disposition", `attachment; filename="rejected-${row.id}-${safeName}.csv"`);
    // Spreadsheet-safe: a raw line from the uploaded file may start with = or @ (spreadsheetSafeCsv).
    res.write(spreadsheetSafeCsv([["line", "reason", "message", "raw_line"]]));
    let batch: [number, string, string, string][] = [];
    for (const rejected of store.uploads.rejectedRows(row.id)) {
      batch.push(rejected);
      if (batch.length === 2000) {
        res.write(spreadsheetSafeCsv(batch));
        batch = [];
      }
    }
    res.end(spreadsheetSafeCsv(batch));
  });

  routes.route("POST", "/:id/retry", { access: FIELD_ROLES, campaignAction: "upload" }, async (req, res) => {
    const user = currentUser(res.locals);
    const row = await store.uploads.forUser(user, uploadId(req.params.id), "upload");
    if (row.status !== "failed" && row.status !== "interrupted") {
      throw new HttpError(409, "not_retryable", `Only failed or interrupted uploads can be retried; this one is ${row.status}.`);
    }
    await access(rawFilePath(env.dataDir, row.sha256)).catch(() => {
      throw new HttpError(409, "raw_file_missing", "The stored raw file of this upload is missing from the data directory, so it cannot be retried. Upload the file again.");
    });
    // The status changes only if it is still failed or interrupted: of two retries at once, the second gets 409.
    await store.uploads.requeue(user.id, row.id);
    ingest.enqueue(row.id);
    const accepted: UploadAccepted = { upload: { id: row.id, status: "queued" } };
    res.status(202).json(accepted);
  });

  return routes;
}
