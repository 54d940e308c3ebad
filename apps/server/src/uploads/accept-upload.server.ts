import { createReadStream } from "node:fs";
import { describeLogFormatError, exactMapping, LogFormatError, type ColumnMapping, type MappingOverrides, type MonitorSettings } from "@calmcrest/seeing-stats";
import { streamLog } from "@calmcrest/seeing-stats/node";
import type { ReadOptions } from "@calmcrest/contracts";
import type { AppContext } from "../context";
import { HttpError } from "../http/errors";
import { monitorForFile, monitorOf, type CampaignRow, type RecordResult } from "../store/index";
import { discardTemporary, storeRawFile, type HashedFile } from "./raw-files.server";

/** Thrown by the header check's handlers to stop reading once the header and mapping are known to work. */
class HeaderChecked extends Error {}

/**
 * Reads the start of the stored file through the same streaming reader the ingest uses and stops as soon as the
 * header line has been read and its mapping checked (however long the header, up to the engine's line limit):
 * binary, UTF-16 and empty files, repeated or unsplittable headers and mappings that cannot work throw the
 * engine's LogFormatError (with its line). Gives the mapping the ingest will use: the overrides sent, every other
 * field matched by name.
 */
export async function checkHeader(path: string, monitor: MonitorSettings, mapping: MappingOverrides | undefined, readOptions?: ReadOptions | undefined): Promise<ColumnMapping> {
  let used: ColumnMapping | null = null;
  const stop = () => {
    throw new HeaderChecked();
  };
  const stream = createReadStream(path, { highWaterMark: 64 * 1024 });
  try {
    await streamLog(stream, { monitor, ...(mapping ? { mapping } : {}), ...readOptions }, {
      onHeader(_headers, checked) {
        used = checked;
        stop();
      },
      onSample: stop,
      onReject: stop,
    });
  } catch (error) {
    if (!(error instanceof HeaderChecked)) throw error;
  } finally {
    stream.destroy();
  }
  if (used === null) throw new LogFormatError("The file has no header line.", { line: null, hint: "Start the log with a line of column names such as time_utc,seeing_arcsec,zenith_deg." });
  return used;
}

/** Thrown once a usable row is found: the rest of the file need not be read before the upload is accepted. */
class UsableRowFound extends Error {}

/**
 * Whether any row of the file can be read into a sample with this mapping and these read options, reading only
 * as far as the first such row (the first data line, for a sound file); for a file with none, the counts of the
 * whole file by reason, for the message. Duplicates of stored samples are not looked for here: the ingest counts them.
 */
export async function findUsableRow(
  path: string,
  monitor: MonitorSettings,
  mapping: ColumnMapping,
  readOptions: ReadOptions | undefined,
): Promise<{ found: true } | { found: false; rowsRead: number; rejectedByReason: Record<string, number> }> {
  const rejectedByReason: Record<string, number> = {};
  const stream = createReadStream(path, { highWaterMark: 64 * 1024 });
  try {
    const result = await streamLog(stream, { monitor, mapping: exactMapping(mapping), ...readOptions }, {
      onSample() {
        throw new UsableRowFound();
      },
      onReject(_line, reason) {
        rejectedByReason[reason] = (rejectedByReason[reason] ?? 0) + 1;
      },
    });
    return { found: false, rowsRead: result.rowsRead, rejectedByReason };
  } catch (error) {
    if (error instanceof UsableRowFound) return { found: true };
    throw error;
  } finally {
    stream.destroy();
  }
}

/** The 422 for a file none of whose rows can be used, sent without "store it anyway". */
export function nothingUsableError(fileName: string, rowsRead: number, rejectedByReason: Record<string, number>): HttpError {
  const reasons = Object.entries(rejectedByReason)
    .sort((left, right) => right[1] - left[1])
    .map(([reason, count]) => `${reason} ${count}`)
    .join(", ");
  const what =
    rowsRead === 0
      ? `${fileName} has a header line but no data rows`
      : `No row of ${fileName} can be used: ${rowsRead} ${rowsRead === 1 ? "row" : "rows"} read, all rejected (${reasons})`;
  return new HttpError(
    422,
    "nothing_usable",
    `${what}. Nothing was stored. Correct the mapping or how the file is read (time format, delimiter, header line) and send it again; to keep the raw file although it adds no sample, send it again with "store it anyway" (the field storeAnyway=true).`,
  );
}

/** True when `text` has a C0 control character (NUL, tab, newline, …) or DEL: never part of a real file name. */
function hasControlCharacter(text: string): boolean {
  for (let index = 0; index < text.length; index += 1) {
    const code = text.charCodeAt(index);
    if (code < 0x20 || code === 0x7f) return true;
  }
  return false;
}

/** A duplicate also says which mapping this request would have read the file with (to offer a re-read with it). */
export type AcceptResult = { kind: "queued"; uploadId: number; /** Stored on "store it anyway" although no row can be used. */ nothingUsable: boolean } | (Extract<RecordResult, { kind: "duplicate" }> & { mapping: ColumnMapping });

/**
 * The one path from a received, hashed temporary file to a queued upload (used by the upload route and by the
 * demo seed): checks the header and mapping (400 if unusable), recognises the same bytes in the same campaign
 * (duplicate), moves the raw file to its content address, records and audits the upload (store.uploads.record,
 * which also catches the same file arriving twice at once), queues the ingest. The temporary file is always consumed.
 */
export async function acceptUpload(
  context: AppContext,
  input: {
    campaign: CampaignRow;
    userId: string;
    file: HashedFile;
    fileName: string;
    mapping: MappingOverrides | undefined;
    readOptions?: ReadOptions | undefined;
    /** The sender confirmed keeping a file none of whose rows can be used; without it such a file is refused (422). */
    storeAnyway?: boolean | undefined;
  },
): Promise<AcceptResult> {
  const { campaign, file } = input;
  const { store } = context;
  try {
    if (hasControlCharacter(input.fileName)) {
      throw new HttpError(
        400,
        "bad_file_name",
        "The file name contains a control character (for example NUL). Nothing was stored; rename the file to plain letters, digits, dots and dashes and send it again.",
        { file: ["The file name contains a control character."] },
      );
    }
    // Check the header and mapping now, so an unusable file is a 400 the wizard can show, not a failed upload later.
    let mapping: ColumnMapping;
    try {
      // Store the mapping actually used: the overrides sent, every other field matched by name.
      mapping = await checkHeader(file.path, monitorForFile(monitorOf(campaign), input.readOptions), input.mapping, input.readOptions);
    } catch (error) {
      if (error instanceof LogFormatError) throw new HttpError(400, "unreadable_log", describeLogFormatError(error).text);
      throw error;
    }
    // A file that cannot give a single sample is refused unless the sender said to keep it anyway.
    const usable = await findUsableRow(file.path, monitorForFile(monitorOf(campaign), input.readOptions), mapping, input.readOptions);
    const nothingUsable = !usable.found;
    if (!usable.found && input.storeAnyway !== true) throw nothingUsableError(input.fileName, usable.rowsRead, usable.rejectedByReason);

    const existing = await store.uploads.duplicateOf(campaign.id, file.sha256);
    if (existing) {
      await discardTemporary(file);
      return { kind: "duplicate", existing, mapping };
    }
    await storeRawFile(context.env.dataDir, file);
    // A duplicate recorded by a concurrent request meanwhile is answered as a duplicate; the raw file (the same
    // bytes, at the same content address) stays with that upload.
    const result = await store.uploads.record(input.userId, {
      campaignId: campaign.id,
      fileName: input.fileName,
      sizeBytes: file.size,
      sha256: file.sha256,
      mapping,
      readOptions: input.readOptions,
    });
    if (result.kind === "queued") context.ingest.enqueue(result.uploadId);
    return result.kind === "queued" ? { ...result, nothingUsable } : { ...result, mapping };
  } catch (error) {
    // storeRawFile moved the file away if it got that far; otherwise drop the temporary copy.
    await discardTemporary(file);
    throw error;
  }
}
