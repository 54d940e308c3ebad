import { createReadStream } from "node:fs";
import { access } from "node:fs/promises";
import type { RequestHandler, Response } from "express";
import multer from "multer";
import { describeLogFormatError, LogFormatError, previewLog, SeeingInputError, type ColumnMapping, type MappingOverrides, type SiteLocation } from "@calmcrest/seeing-stats";
import {
  dateInWords,
  mappingOverridesSchema,
  readOptionsSchema,
  rereadUploadSchema,
  restoreUploadSchema,
  spreadsheetSafeCsv,
  withdrawUploadSchema,
  type ReadOptions,
  type RereadAccepted,
  type UploadAccepted,
  type UploadDuplicateBody,
  type UploadPreview,
  type WholeFileCheck,
} from "@calmcrest/contracts";
import type { AppContext } from "../context";
import { FIELD_ROLES, routeId, type CampaignAction } from "../access/access.server";
import { HttpError, notFound, parseOr400 } from "../http/errors";
import { ApiRouter } from "../http/route-table";
import { currentUser } from "../http/session";
import { effectiveCampaign, monitorColumns, monitorForFile, monitorOf, readOptionsOf, siteLocationOf, uploadListItem, type CampaignRow } from "../store/index";
import { acceptUpload, checkHeader } from "../uploads/accept-upload.server";
import { discardTemporary, hashingDiskStorage, rawFilePath, type HashedFile } from "../uploads/raw-files.server";
import { checkingStorage, type CheckedFile } from "../uploads/whole-file-check.server";

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace Express {
    interface Locals {
      /** Set by campaignAccess before multer runs. */
      campaign?: CampaignRow;
      /** The campaign's site, set before the whole-file check's multer runs (its storage engine cannot wait for a query). */
      siteLocation?: SiteLocation;
      /** Set by the whole-file check before multer runs: the campaign's stored sample times, ascending. */
      storedTimes?: Float64Array;
    }
  }
}

/** Resolves when the response can take more (drain) or the client has gone (close). */
function drainedOrClosed(res: Response): Promise<void> {
  return new Promise((resolve) => {
    const done = () => {
      res.off("drain", done);
      res.off("close", done);
      resolve();
    };
    res.once("drain", done);
    res.once("close", done);
  });
}

/** Rows of rejected.csv read and written at a time. */
const REJECTED_CSV_BATCH_ROWS = 500;

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

/** The multipart `readOptions` field: JSON { timeFormat, utcOffsetMinutes, delimiter, headerLine }, or absent (ISO 8601 UTC, detected). */
function parseReadOptionsField(value: unknown): ReadOptions | undefined {
  if (value === undefined || value === "") return undefined;
  let parsed: unknown;
  try {
    parsed = typeof value === "string" ? JSON.parse(value) : undefined;
  } catch {
    parsed = undefined;
  }
  if (parsed === undefined) {
    throw new HttpError(400, "invalid_input", 'The read options are not valid JSON. Send them like {"timeFormat":"jd"} or {"timeFormat":"dmy","utcOffsetMinutes":120}.', {
      readOptions: ["Not valid JSON."],
    });
  }
  return parseOr400(readOptionsSchema, parsed, "The read options");
}

/** The multipart `storeAnyway` field: "true" keeps a file none of whose rows can be used; absent or "false" refuses it. */
function parseStoreAnywayField(value: unknown): boolean {
  if (value === undefined || value === "" || value === "false") return false;
  if (value === "true") return true;
  throw new HttpError(400, "invalid_input", 'storeAnyway must be "true" or "false" (or left out). Send "true" only after the person confirmed keeping a file with no usable row.', {
    storeAnyway: ['Send "true" or "false".'],
  });
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
    const readOptions = parseReadOptionsField(body?.readOptions);
    const site = await store.campaigns.siteOf(campaign);
    try {
      const preview = previewLog(text, {
        monitor: monitorForFile(monitorOf(campaign), readOptions),
        site: siteLocationOf(site),
        maxRows: 20,
        ...(mapping ? { mapping } : {}),
        ...readOptions,
      });
      const answer: UploadPreview = {
        delimiter: preview.delimiter,
        headers: preview.headers,
        // The proposal is always from the headers alone, so the wizard can offer it even when a mapping was sent.
        proposedMapping: mapping ? previewLog(text, { monitor: monitorOf(campaign), maxRows: 0, ...readOptions }).proposedMapping : preview.proposedMapping,
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

  // The whole file read as the upload would read it, as it arrives; nothing is stored (the wizard's honest check).
  const receiveCheck = withUploadErrors(
    multer({
      storage: checkingStorage((req) => {
        const locals = req.res?.locals;
        if (!locals?.siteLocation) throw notFound("That campaign");
        const campaign = accessedCampaign(locals);
        const readOptions = parseReadOptionsField((req.body as Record<string, unknown> | undefined)?.readOptions);
        return {
          mapping: parseMappingField((req.body as Record<string, unknown> | undefined)?.mapping),
          readOptions,
          monitor: monitorForFile(monitorOf(campaign), readOptions),
          site: locals.siteLocation,
          storedTimes: () => locals.storedTimes ?? new Float64Array(0),
        };
      }),
      limits: { fileSize: env.maxUploadBytes, files: 1, fields: 10 },
    }).single("file"),
    limitMb,
  );

  routes.route(
    "POST",
    "/check",
    { access: FIELD_ROLES, campaignAction: "upload" },
    campaignAccess("upload"),
    async (_req, res, next) => {
      res.locals.siteLocation = siteLocationOf(await store.campaigns.siteOf(accessedCampaign(res.locals)));
      // Read by a summary worker before the file arrives: a campaign's million times never load on the main thread.
      res.locals.storedTimes = await context.summaries.storedTimes(accessedCampaign(res.locals).id);
      next();
    },
    async (req, res, next) => {
      try {
        await new Promise<void>((resolve, reject) => receiveCheck(req, res, (error?: unknown) => (error ? reject(error) : resolve())));
      } catch (error) {
        if (error instanceof LogFormatError) return next(new HttpError(400, "unreadable_log", describeLogFormatError(error).text));
        if (error instanceof SeeingInputError) return next(new HttpError(400, "invalid_input", error.message));
        return next(error);
      }
      next();
    },
    async (req, res) => {
      const file = req.file as (Express.Multer.File & CheckedFile) | undefined;
      if (!file) throw new HttpError(400, "invalid_input", 'Send the log as the file field "file" (after the mapping field).', { file: ["No file was sent."] });
      const existing = await store.uploads.duplicateOf(accessedCampaign(res.locals).id, file.check.sha256);
      const answer: WholeFileCheck = { ...file.check, sameFile: existing ? { uploadId: existing.id, fileName: existing.file_name, uploadedAt: existing.uploaded_at } : null };
      res.json(answer);
    },
  );

  routes.route("POST", "/", { access: FIELD_ROLES, campaignAction: "upload" }, campaignAccess("upload"), receiveFile, async (req, res) => {
    const user = currentUser(res.locals);
    const campaign = accessedCampaign(res.locals);
    const file = req.file as (Express.Multer.File & HashedFile) | undefined;
    if (!file) throw new HttpError(400, "invalid_input", 'Send the log as the file field "file".', { file: ["No file was sent."] });
    let mapping: MappingOverrides | undefined;
    let readOptions: ReadOptions | undefined;
    let storeAnyway = false;
    try {
      mapping = parseMappingField((req.body as Record<string, unknown> | undefined)?.mapping);
      readOptions = parseReadOptionsField((req.body as Record<string, unknown> | undefined)?.readOptions);
      storeAnyway = parseStoreAnywayField((req.body as Record<string, unknown> | undefined)?.storeAnyway);
    } catch (error) {
      await discardTemporary(file);
      throw error;
    }
    const result = await acceptUpload(context, { campaign, userId: user.id, file, fileName: file.originalname, mapping, readOptions, storeAnyway });
    if (result.kind === "duplicate") {
      const { existing } = result;
      // Same bytes with another mapping: offer to re-read the stored file with it (for those who may), not a dead end.
      const mayReread = user.role === "lead" || existing.uploaded_by === user.id;
      const differs = !sameMapping(result.mapping, JSON.parse(existing.mapping) as ColumnMapping);
      const when = dateInWords(existing.uploaded_at);
      const duplicate: UploadDuplicateBody = {
        error: {
          code: "duplicate_upload",
          message:
            differs && mayReread
              ? `This file was uploaded to this campaign already (${existing.file_name}, on ${when}), read with another mapping. Its samples are counted once; to read it with this mapping instead, re-read the stored file.`
              : `This file was uploaded to this campaign already (${existing.file_name}, on ${when}); its samples are counted once.`,
        },
        upload: uploadListItem(existing),
        rereadOffer: differs && mayReread ? { uploadId: existing.id, mapping: result.mapping } : null,
      };
      res.status(409).json(duplicate);
      return;
    }
    const accepted: UploadAccepted = {
      upload: { id: result.uploadId, status: "queued" },
      storedAnyway: result.nothingUsable
        ? `Stored as asked ("store it anyway"), although no row of ${file.originalname} can be used: it adds no sample to any statistic. Re-read it with a corrected mapping, or withdraw it.`
        : null,
    };
    res.status(202).json(accepted);
  });

  return routes;
}

/** Read options without the file's own wavelength, when corrected monitor settings replace it. */
function withoutWavelength(options: ReadOptions, drop: boolean): ReadOptions {
  if (!drop || options.wavelengthNm === undefined) return options;
  const { wavelengthNm: _dropped, ...rest } = options;
  return rest;
}

/** Two mappings name the same header for the same fields (order does not matter). */
function sameMapping(left: ColumnMapping, right: ColumnMapping): boolean {
  const entries = (mapping: ColumnMapping) =>
    Object.entries(mapping)
      .filter(([, header]) => header !== undefined)
      .sort(([a], [b]) => a.localeCompare(b));
  return JSON.stringify(entries(left)) === JSON.stringify(entries(right));
}

/** The file name without its last extension, for download names (`log.csv` -> `log`, so no `….csv.csv`). */
function baseName(fileName: string): string {
  const safe = fileName.replace(/[^\w.-]+/g, "_");
  const dot = safe.lastIndexOf(".");
  return dot > 0 ? safe.slice(0, dot) : safe;
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
    res.setHeader("Content-Disposition", `attachment; filename="rejected-${row.id}-${baseName(row.file_name)}.csv"`);
    // Spreadsheet-safe: a raw line from the uploaded file may start with = or @ (spreadsheetSafeCsv).
    res.write(spreadsheetSafeCsv([["line", "reason", "message", "raw_line"]]));
    // A batch at a time, yielding between batches (and waiting while the client's socket is full): a file with a
    // million rejected rows must not hold up every other request while its list is written.
    let afterLine = 0;
    for (;;) {
      const batch = store.uploads.rejectedRowsAfter(row.id, afterLine, REJECTED_CSV_BATCH_ROWS);
      const last = batch.at(-1);
      if (!last) break;
      afterLine = last[0];
      const flushed = res.write(spreadsheetSafeCsv(batch));
      await (flushed ? new Promise((resolve) => setImmediate(resolve)) : drainedOrClosed(res));
      if (res.destroyed) return;
    }
    res.end();
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
    const accepted: UploadAccepted = { upload: { id: row.id, status: "queued" }, storedAnyway: null };
    res.status(202).json(accepted);
  });

  routes.route("GET", "/:id/raw", { access: FIELD_ROLES, campaignAction: "read" }, async (req, res) => {
    const row = await store.uploads.forUser(currentUser(res.locals), uploadId(req.params.id), "read");
    const path = rawFilePath(env.dataDir, row.sha256);
    await access(path).catch(() => {
      throw new HttpError(404, "raw_file_missing", "The stored raw file of this upload is missing from the data directory. Restore it from a backup (npm run restore).");
    });
    const safe = row.file_name.replace(/[^\w.-]+/g, "_");
    res.setHeader("Content-Type", "application/octet-stream");
    res.setHeader("Content-Length", String(row.size_bytes));
    res.setHeader("Content-Disposition", `attachment; filename="${safe}"`);
    await new Promise<void>((resolve, reject) => {
      const stream = createReadStream(path);
      stream.on("error", reject);
      res.on("close", () => {
        stream.destroy();
        resolve();
      });
      stream.pipe(res);
    });
  });

  routes.route("POST", "/:id/withdraw", { access: FIELD_ROLES, campaignAction: "upload" }, async (req, res) => {
    const user = currentUser(res.locals);
    const row = await store.uploads.forUser(user, uploadId(req.params.id), "upload");
    const input = parseOr400(withdrawUploadSchema, req.body, "The withdrawal");
    await store.uploads.withdraw(user, row, input.reason);
    res.json(await store.uploads.status(await store.uploads.forUser(user, row.id, "read"), undefined));
  });

  routes.route("POST", "/:id/restore", { access: FIELD_ROLES, campaignAction: "upload" }, async (req, res) => {
    const user = currentUser(res.locals);
    const row = await store.uploads.forUser(user, uploadId(req.params.id), "upload");
    const input = parseOr400(restoreUploadSchema, req.body ?? {}, "The restore");
    await store.uploads.restore(user, row, input.reason);
    res.json(await store.uploads.status(await store.uploads.forUser(user, row.id, "read"), undefined));
  });

  routes.route("POST", "/:id/reread", { access: FIELD_ROLES, campaignAction: "upload" }, async (req, res) => {
    const user = currentUser(res.locals);
    const row = await store.uploads.forUser(user, uploadId(req.params.id), "upload");
    const input = parseOr400(rereadUploadSchema, req.body, "The re-read");
    const path = rawFilePath(env.dataDir, row.sha256);
    await access(path).catch(() => {
      throw new HttpError(409, "raw_file_missing", "The stored raw file of this upload is missing from the data directory, so it cannot be re-read. Upload the file again.");
    });
    const campaign = await store.campaigns.forUser(user, row.campaign_id, "upload");
    const corrected = input.monitor ? { ...campaign, ...monitorColumns(input.monitor) } : effectiveCampaign(campaign, row);
    // The stored read options unless new ones are sent; corrected monitor settings bring their own wavelength.
    const rereadOptions = input.readOptions ?? withoutWavelength(readOptionsOf(row), input.monitor !== undefined);
    let mapping: ColumnMapping;
    try {
      mapping = await checkHeader(path, monitorForFile(monitorOf(corrected), rereadOptions), input.mapping ?? (JSON.parse(row.mapping) as ColumnMapping), rereadOptions);
    } catch (error) {
      if (error instanceof LogFormatError) throw new HttpError(400, "unreadable_log", describeLogFormatError(error).text);
      throw error;
    }
    const newId = await store.uploads.reread(user, row, { mapping, monitor: input.monitor, reason: input.reason, readOptions: input.readOptions ?? (input.monitor ? rereadOptions : undefined) });
    ingest.enqueue(newId);
    const accepted: RereadAccepted = { upload: { id: newId, status: "queued" }, replaces: row.id };
    res.status(202).json(accepted);
  });

  return routes;
}
