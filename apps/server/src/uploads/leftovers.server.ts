import { readdir, rm, stat } from "node:fs/promises";
import { join } from "node:path";
import type { Store } from "../store/index";
import { tmpDir } from "./raw-files.server";

export interface LeftoverReport {
  /** Temporary files of transfers that never finished (<dataDir>/tmp/*.part and anything else there). */
  temporaryFiles: string[];
  /** Stored raw files that no upload row refers to (a server stopped between storing a file and recording it). */
  orphanRawFiles: string[];
  bytesFreed: number;
}

async function sizeOf(path: string): Promise<number> {
  try {
    return (await stat(path)).size;
  } catch {
    return 0;
  }
}

async function listDir(path: string): Promise<string[]> {
  try {
    return await readdir(path);
  } catch {
    return [];
  }
}

/**
 * Start-up cleaning of what a killed server can leave behind, before any request is served: every file in
 * <dataDir>/tmp (a transfer in progress writes there, and none is in progress yet), and every file under
 * <dataDir>/uploads whose sha256 no upload row has (the upload was stored, then the process died before its row
 * was written: nobody can see or retry it). A raw file that any upload row refers to is never touched.
 */
export async function cleanLeftovers(store: Store, dataDir: string): Promise<LeftoverReport> {
  const report: LeftoverReport = { temporaryFiles: [], orphanRawFiles: [], bytesFreed: 0 };
  const tmp = tmpDir(dataDir);
  for (const name of await listDir(tmp)) {
    const path = join(tmp, name);
    report.bytesFreed += await sizeOf(path);
    await rm(path, { recursive: true, force: true });
    report.temporaryFiles.push(name);
  }

  const known = await store.uploads.storedSha256s();
  const uploads = join(dataDir, "uploads");
  for (const prefix of await listDir(uploads)) {
    for (const name of await listDir(join(uploads, prefix))) {
      if (known.has(name.toLowerCase())) continue;
      const path = join(uploads, prefix, name);
      report.bytesFreed += await sizeOf(path);
      await rm(path, { force: true });
      report.orphanRawFiles.push(`${prefix}/${name}`);
    }
  }
  return report;
}

/** The start-up log line for a cleaning, or null when there was nothing to clean. */
export function describeLeftovers(report: LeftoverReport): string | null {
  const parts: string[] = [];
  if (report.temporaryFiles.length > 0) parts.push(`${report.temporaryFiles.length} unfinished transfer file(s) in tmp/ (${report.temporaryFiles.join(", ")})`);
  if (report.orphanRawFiles.length > 0) parts.push(`${report.orphanRawFiles.length} stored raw file(s) no upload refers to (uploads/${report.orphanRawFiles.join(", uploads/")})`);
  if (parts.length === 0) return null;
  return `Calmcrest: removed what a stopped server left behind: ${parts.join("; ")}; ${(report.bytesFreed / 1024 / 1024).toFixed(1)} MB freed.`;
}
