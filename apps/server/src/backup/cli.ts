import { resolve } from "node:path";
import { toError } from "../http/errors";
import { backupDataDir, restoreBackup } from "./backup.server";

// `npm run backup [-- --to <folder>]` and `npm run restore -- <backup folder>`. The data directory is
// CALMCREST_DATA_DIR (default ./data, as for the server); backups go to CALMCREST_BACKUP_DIR (default ./backups).
const [command, ...rest] = process.argv.slice(2);
const dataDir = resolve(process.env.CALMCREST_DATA_DIR ?? "./data");

function mb(bytes: number): string {
  return `${(bytes / 1024 / 1024).toFixed(1)} MB`;
}

async function main(): Promise<void> {
  if (command === "backup") {
    const toIndex = rest.indexOf("--to");
    const backupRoot = resolve(toIndex >= 0 && rest[toIndex + 1] ? rest[toIndex + 1] ?? "" : (process.env.CALMCREST_BACKUP_DIR ?? "./backups"));
    const startedMs = Date.now();
    const { folder, manifest } = await backupDataDir(dataDir, backupRoot);
    console.log(
      `Calmcrest: backed up ${dataDir} to ${folder} in ${((Date.now() - startedMs) / 1000).toFixed(1)} s: database ${mb(manifest.database.bytes)} (${manifest.uploads} uploads, ${manifest.samples} samples), ${manifest.rawFiles.count} raw files (${mb(manifest.rawFiles.bytes)}).`,
    );
    return;
  }
  if (command === "restore") {
    const folder = rest.find((arg) => !arg.startsWith("--"));
    if (!folder) throw new Error("Say which backup to restore: npm run restore -- backups/calmcrest-backup-2026-12-03T02-00-00Z");
    const manifest = await restoreBackup(folder, dataDir);
    console.log(
      `Calmcrest: restored the backup of ${manifest.createdAt} (${manifest.uploads} uploads, ${manifest.samples} samples, ${manifest.rawFiles.count} raw files) into ${dataDir}. Start the server with this CALMCREST_DATA_DIR.`,
    );
    return;
  }
  throw new Error("Usage: npm run backup [-- --to <folder>]   or   npm run restore -- <backup folder>");
}

main().catch((thrown: unknown) => {
  console.error(`Calmcrest: ${toError(thrown).message}`);
  process.exit(1);
});
