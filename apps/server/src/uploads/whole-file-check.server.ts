import { createHash } from "node:crypto";
import { Transform } from "node:stream";
import type { Request } from "express";
import type { StorageEngine } from "multer";
import { DEFAULT_FILTERS, filterReason, readingWarnings, type MappingOverrides, type MonitorSettings, type SiteLocation } from "@calmcrest/seeing-stats";
import { streamLog } from "@calmcrest/seeing-stats/node";
import type { CheckedProblemLine, ReadOptions, RejectReasonName, WholeFileCheck } from "@calmcrest/contracts";

/** Problem lines kept per reason (the first ones in the file). */
export const PROBLEM_LINES_PER_REASON = 3;

/** The longest raw text kept for one problem line (a 1 MiB line is not sent back whole). */
const RAW_LINE_CHARS = 300;

export interface CheckOptions {
  mapping: MappingOverrides | undefined;
  /** How the times are written (ISO 8601 UTC when absent). */
  readOptions?: ReadOptions | undefined;
  monitor: MonitorSettings;
  site: SiteLocation;
  /** Sample times the campaign holds already, ascending (a row at one of them would be a duplicate_time). */
  storedTimes: () => Float64Array;
}

function isStored(sortedTimes: Float64Array, timeMs: number): boolean {
  let low = 0;
  let high = sortedTimes.length - 1;
  while (low <= high) {
    const middle = (low + high) >> 1;
    const value = sortedTimes[middle] ?? Number.NaN;
    if (value === timeMs) return true;
    if (value < timeMs) low = middle + 1;
    else high = middle - 1;
  }
  return false;
}

/**
 * Reads a whole log as the upload would (the engine's streaming reader, the same mapping, monitor and site),
 * stores nothing, and counts every row: usable, or rejected by reason (including times repeated in the file or
 * already stored in the campaign, which the ingest rejects as duplicate_time), with the first problem lines of
 * each reason, and how many usable rows the standard zenith and sun limits will set aside in the statistics.
 * Throws the engine's LogFormatError for a file that cannot be read at all.
 */
export async function checkWholeFile(source: NodeJS.ReadableStream, fileName: string, options: CheckOptions): Promise<Omit<WholeFileCheck, "sameFile">> {
  const startedMs = Date.now();
  // The bytes' sha256 on the way through, so the caller can say when the same file is stored already.
  const hash = createHash("sha256");
  const input = source.pipe(
    new Transform({
      transform(chunk: Buffer, _encoding, done) {
        hash.update(chunk);
        done(null, chunk);
      },
    }),
  );
  const rejectedByReason: Partial<Record<RejectReasonName, number>> = {};
  const problemLines: CheckedProblemLine[] = [];
  const seen = new Set<number>();
  let stored: Float64Array | null = null;
  let usable = 0;
  let sizeBytes = 0;
  // The server's standard statistics: 60° zenith limit, sun below −18°, no flux minimum, anisotropy not filtered.
  const standard = { ...DEFAULT_FILTERS, minFlux: null, leaveOutAnisotropic: false };
  const setAside = { zenith_limit: 0, sun_above_limit: 0, maxZenithDeg: standard.maxZenithDeg, sunMaxDeg: standard.sunMaxDeg };

  const reject = (line: number, reason: RejectReasonName, message: string, rawLine: string) => {
    const count = (rejectedByReason[reason] ?? 0) + 1;
    rejectedByReason[reason] = count;
    if (count <= PROBLEM_LINES_PER_REASON) problemLines.push({ line, reason, message, rawLine: rawLine.length > RAW_LINE_CHARS ? `${rawLine.slice(0, RAW_LINE_CHARS)}…` : rawLine });
  };

  const result = await streamLog(
    input,
    { ...(options.mapping ? { mapping: options.mapping } : {}), ...options.readOptions, monitor: options.monitor, site: options.site, onProgress: (bytes) => (sizeBytes = bytes) },
    {
      onSample(sample, line, fields, delimiter) {
        stored ??= options.storedTimes();
        if (seen.has(sample.timeMs) || isStored(stored, sample.timeMs)) {
          const where = seen.has(sample.timeMs) ? "an earlier row of this file has" : "this campaign already holds a sample at";
          reject(line, "duplicate_time", `Another sample has the time ${new Date(sample.timeMs).toISOString()} (${where} it).`, fields.join(delimiter));
          return;
        }
        seen.add(sample.timeMs);
        usable += 1;
        const reason = filterReason(sample, standard);
        if (reason === "zenith_limit" || reason === "sun_above_limit") setAside[reason] += 1;
      },
      onReject(line, reason, message, rawLine) {
        reject(line, reason, message, rawLine);
      },
    },
  );
  problemLines.sort((left, right) => left.line - right.line);
  const rejected = result.rowsRead - usable;
  return {
    fileName,
    sizeBytes,
    delimiter: result.delimiter,
    preambleLines: result.preambleLines,
    headers: result.headers,
    mapping: result.mapping,
    rowsRead: result.rowsRead,
    usable,
    rejected,
    rejectedByReason,
    problemLines,
    setAsideByStandardFilters: setAside,
    warnings: readingWarnings({ read: result.rowsRead, rejectedByReason }),
    sha256: hash.digest("hex"),
    durationMs: Date.now() - startedMs,
  };
}

/** What the check's storage engine adds to multer's file object: the result, never a file on disk. */
export interface CheckedFile {
  check: Omit<WholeFileCheck, "sameFile">;
}

/**
 * A multer storage engine that checks the file as its bytes arrive (nothing is written to disk), so the transfer
 * and the check finish together. `optionsFor` runs when the file part starts, after the form fields before it
 * (the mapping must come before the file).
 */
export function checkingStorage(optionsFor: (req: Request) => CheckOptions): StorageEngine {
  return {
    _handleFile(req: Request, file, callback) {
      let options: CheckOptions;
      try {
        options = optionsFor(req);
      } catch (error) {
        file.stream.resume();
        callback(error instanceof Error ? error : new Error(String(error)));
        return;
      }
      checkWholeFile(file.stream, file.originalname, options).then(
        (check) => callback(null, { check } as Partial<Express.Multer.File> & CheckedFile),
        (error: unknown) => {
          // Let the rest of the body flow so the answer can be sent.
          file.stream.resume();
          callback(error instanceof Error ? error : new Error(String(error)));
        },
      );
    },
    _removeFile(_req: Request, _file, callback) {
      callback(null);
    },
  };
}
