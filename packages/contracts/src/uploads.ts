import { z } from "zod";
import { mappingOverridesSchema, monitorSettingsSchema, type CampaignMonitor, type ColumnMappingInput } from "./campaigns";
import { DELIMITER_CHOICES, TIME_FORMATS, type LogSample } from "@calmcrest/seeing-stats";

export const UPLOAD_STATUSES = ["queued", "ingesting", "done", "failed", "interrupted"] as const;
export type UploadStatusName = (typeof UPLOAD_STATUSES)[number];

/**
 * Why a row did not become an accepted sample. The first group is decided at ingest (the row is not stored);
 * the filter reasons and `excluded_window` are applied at summary time with the query's settings.
 */
export const REJECT_REASONS = [
  "unterminated_quote",
  "stray_quote",
  "line_too_long",
  "wrong_field_count",
  "unreadable_time",
  "implausible_time",
  "missing_value",
  "non_decimal_number",
  "non_physical",
  "noise_dominated",
  "exposure_correction_too_large",
  "implausible_seeing",
  "duplicate_time",
  "zenith_limit",
  "sun_above_limit",
  "low_flux",
  "anisotropic",
  "excluded_window",
] as const;
export type RejectReasonName = (typeof REJECT_REASONS)[number];

export interface SampleCounts {
  read: number;
  accepted: number;
  rejected: number;
  rejectedByReason: Partial<Record<RejectReasonName, number>>;
}

export interface RejectedRow {
  /** 1-based line number in the uploaded file. */
  line: number;
  reason: RejectReasonName;
  message: string;
}

/** An upload as listed in a campaign. */
export interface UploadListItem {
  id: number;
  campaignId: number;
  fileName: string;
  sizeBytes: number;
  sha256: string;
  uploadedBy: { id: string; name: string };
  uploadedAt: string;
  mapping: ColumnMappingInput;
  status: UploadStatusName;
  /** Ingest-time counts: read = data rows in the file; accepted = samples stored. */
  samples: SampleCounts;
  /**
   * For a done upload, problems that did not stop the ingest but must be seen: lines that could not be split
   * into fields, or more than 10 % of the rows unusable (the engine's readingWarnings). [] when clean or not done.
   */
  warnings: { code: "lines_not_split" | "many_rows_unusable" | "no_data_rows"; message: string }[];
  error: string | null;
  finishedAt: string | null;
  /** Set while the upload is withdrawn: its samples are in no statistic; the raw file stays stored. */
  withdrawn: { at: string; by: { id: string; name: string }; reason: string } | null;
  /** A re-read of a stored raw file names the upload it replaced. */
  replacesUploadId: number | null;
  /** The re-read that replaced this upload, if any (the newest). */
  replacedByUploadId: number | null;
  /** Corrected monitor settings a re-read was made with (null: the campaign's). */
  monitorOverride: CampaignMonitor | null;
  /** How the file's times were read (ISO 8601 UTC unless the upload said otherwise). */
  readOptions: ReadOptions;
}

/** `GET /api/uploads/:id`. Poll it while status is queued or ingesting. */
export interface UploadStatus extends UploadListItem {
  /** 0..1; fraction of the file's bytes read while ingesting, 1 when done. */
  progress: number;
  /** The first 100 rejected rows; `GET /api/uploads/:id/rejected.csv` gives all of them. */
  rejectedRows: RejectedRow[];
  startedAt: string | null;
}

/** 202 answer of `POST /api/campaigns/:id/uploads` once the raw file is stored. */
export interface UploadAccepted {
  upload: { id: number; status: UploadStatusName };
  /**
   * Set when the file was stored on "store it anyway" (multipart field storeAnyway=true) although no row can be
   * used: the sentence saying so. null otherwise. Without the field such a file is refused with 422 nothing_usable.
   */
  storedAnyway: string | null;
}

/**
 * 409 answer of `POST /api/campaigns/:id/uploads` when the same bytes were already uploaded to this campaign.
 * `upload` is the one that holds those bytes now (the newest re-read, if any); `rereadOffer` is set when the file
 * was sent with a different mapping and the caller may re-read the stored file with it (POST /api/uploads/:id/reread).
 */
export interface UploadDuplicateBody {
  error: { code: "duplicate_upload"; message: string };
  upload: UploadListItem;
  rereadOffer: { uploadId: number; mapping: ColumnMappingInput } | null;
}

const reasonText = (what: string) =>
  z
    .string({ error: `Say why the upload is ${what}.` })
    .trim()
    .min(3, `Say in a few words why the upload is ${what} (at least 3 characters).`)
    .max(500, "Keep the reason under 500 characters.");

/** Body of `POST /api/uploads/:id/withdraw`: the samples leave every statistic; the raw file stays. */
export const withdrawUploadSchema = z.object({ reason: reasonText("withdrawn") });
export type WithdrawUploadInput = z.infer<typeof withdrawUploadSchema>;

/** Body of `POST /api/uploads/:id/restore`. */
export const restoreUploadSchema = z.object({ reason: reasonText("restored").optional() });
export type RestoreUploadInput = z.infer<typeof restoreUploadSchema>;

/**
 * Body of `POST /api/uploads/:id/reread`: read the stored raw file again with a corrected mapping and/or corrected
 * monitor settings. A new upload replaces the old one, which is withdrawn in the same transaction.
 */
export const rereadUploadSchema = z
  .object({
    /** Overrides of the fields it names, like an upload's mapping (the web app sends every field). */
    mapping: mappingOverridesSchema.optional(),
    monitor: monitorSettingsSchema.optional(),
    /** How the file's times are written (the old upload's when absent). */
    readOptions: z.lazy(() => readOptionsSchema).optional(),
    reason: reasonText("read again"),
  });
export type RereadUploadInput = z.input<typeof rereadUploadSchema>;

/** 202 answer of `POST /api/uploads/:id/reread`. */
export interface RereadAccepted {
  upload: { id: number; status: UploadStatusName };
  replaces: number;
}

/** Writes an ISO instant as words for messages: "3 December 2026 at 14:05 UTC". */
export function dateInWords(iso: string): string {
  const date = new Date(iso);
  if (!Number.isFinite(date.getTime())) return iso;
  const months = ["January", "February", "March", "April", "May", "June", "July", "August", "September", "October", "November", "December"];
  const pad = (value: number) => String(value).padStart(2, "0");
  return `${date.getUTCDate()} ${months[date.getUTCMonth()] ?? ""} ${date.getUTCFullYear()} at ${pad(date.getUTCHours())}:${pad(date.getUTCMinutes())} UTC`;
}

/** A sample as the seeing engine reads it (zenith, 500 nm), shown in the upload preview: the engine's LogSample. */
export type PreviewSample = LogSample;

export interface UploadPreview {
  delimiter: string;
  headers: string[];
  proposedMapping: ColumnMappingInput;
  /** Problems with the mapping used (sent or proposed); [] means it can be used. */
  mappingProblems: string[];
  /** The mapping the rows were read with. */
  mappingUsed: ColumnMappingInput;
  rows: { line: number; values: Record<string, string>; sample: PreviewSample | null; problem: string | null }[];
}

/** One problem line of the whole-file check, with its text as it is in the file. */
export interface CheckedProblemLine {
  line: number;
  reason: RejectReasonName;
  message: string;
  rawLine: string;
}

/**
 * `POST /api/campaigns/:id/uploads/check`: every row of the file read as the upload would read it; nothing stored.
 * usable + rejected = rowsRead. `setAsideByStandardFilters` counts usable rows that the standard zenith and sun
 * limits leave out of the statistics later (the analyzer counts those as rejected).
 */
export interface WholeFileCheck {
  fileName: string;
  sizeBytes: number;
  delimiter: string;
  /** Lines above the header line named in the read options, skipped as preamble (0 without one). */
  preambleLines: number;
  headers: string[];
  mapping: ColumnMappingInput;
  rowsRead: number;
  usable: number;
  rejected: number;
  rejectedByReason: Partial<Record<RejectReasonName, number>>;
  /** The first few problem lines of each reason, in line order. */
  problemLines: CheckedProblemLine[];
  setAsideByStandardFilters: { zenith_limit: number; sun_above_limit: number; maxZenithDeg: number; sunMaxDeg: number };
  warnings: UploadListItem["warnings"];
  /** The same bytes are stored in this campaign already (sha256): an upload would be recognised, not counted twice. */
  sameFile: { uploadId: number; fileName: string; uploadedAt: string } | null;
  /** sha256 of the bytes checked (lower-case hex). */
  sha256: string;
  durationMs: number;
}

/**
 * How a file is read beyond its mapping (multipart field `readOptions`, JSON): the time format (`iso` by default;
 * `jd`, `mjd`, `dmy`, `mdy`) and the zone of times written without one, in minutes east of UTC; the delimiter
 * when it should not be detected (`,` `;` `tab` `space` `whitespace`: runs of spaces or tabs); the line holding the
 * column names when a plain-text preamble stands above it (1-based; the lines above are skipped and counted); the
 * wavelength the file's seeing or r0 was measured at when it is not the campaign monitor's.
 */
export const readOptionsSchema = z.object({
  timeFormat: z.enum(TIME_FORMATS, { error: "timeFormat must be iso, jd, mjd, dmy or mdy." }).default("iso"),
  utcOffsetMinutes: z
    .number({ error: "utcOffsetMinutes must be a whole number of minutes east of UTC." })
    .int("utcOffsetMinutes must be a whole number of minutes east of UTC.")
    .min(-14 * 60, "utcOffsetMinutes must be between -840 and 840 (UTC-14:00 to UTC+14:00).")
    .max(14 * 60, "utcOffsetMinutes must be between -840 and 840 (UTC-14:00 to UTC+14:00).")
    .default(0),
  delimiter: z.enum(DELIMITER_CHOICES, { error: "delimiter must be \",\", \";\", \"tab\", \"space\" or \"whitespace\" (runs of spaces or tabs); leave it out to have it detected." }).optional(),
  headerLine: z
    .number({ error: "headerLine must be the number of the line holding the column names (1 is the first line)." })
    .int("headerLine must be a whole line number (1 is the first line).")
    .min(1, "headerLine must be at least 1 (the first line of the file).")
    .max(10_000, "headerLine must be at most 10000; a preamble is a few lines of text above the column names.")
    .optional(),
  /**
   * The wavelength this file's seeing or r0 was measured at, when it differs from the campaign's monitor (the
   * engine scales seeing to 500 nm by λ^(1/5)); variance logs do not depend on it. Absent: the campaign's.
   */
  wavelengthNm: z
    .number({ error: "wavelengthNm must be the wavelength the file's seeing or r0 was measured at, in nanometres (e.g. 550)." })
    .min(300, "wavelengthNm must be between 300 and 2500 nm (a seeing monitor measures in visible or near-infrared light).")
    .max(2500, "wavelengthNm must be between 300 and 2500 nm (a seeing monitor measures in visible or near-infrared light).")
    .optional(),
});
export type ReadOptions = z.output<typeof readOptionsSchema>;
export type ReadOptionsInput = z.input<typeof readOptionsSchema>;
