import { createHash } from "node:crypto";
import { createReadStream, createWriteStream, existsSync, mkdirSync, readdirSync, readFileSync, renameSync, rmSync, statSync, writeFileSync } from "node:fs";
import { dirname, join, resolve } from "node:path";
import { Transform } from "node:stream";
import { pipeline } from "node:stream/promises";
import Database from "better-sqlite3";
import { rawFilePath } from "../uploads/raw-files.server";

/** The database file inside a data directory and inside a backup folder. */
export const DATABASE_FILE = "calmcrest.sqlite";
const MANIFEST_FILE = "manifest.json";
const BACKUP_FORMAT = 1;

export interface BackupManifest {
  format: number;
  createdAt: string;
  /** The data directory the backup was taken from. */
  source: string;
  database: { file: string; bytes: number; sha256: string };
  uploads: number;
  samples: number;
  rawFiles: { count: number; bytes: number };
}

/** The folder name of a backup taken at `date`: calmcrest-backup-2026-12-03T14-05-09Z (sorts by time). */
export function backupFolderName(date: Date): string {
  return `calmcrest-backup-${date.toISOString().replace(/\.\d{3}Z$/, "Z").replaceAll(":", "-")}`;
}

/** Copies a file while computing its sha256; returns the digest and the byte count. */
async function copyHashing(from: string, to: string): Promise<{ sha256: string; bytes: number }> {
  mkdirSync(dirname(to), { recursive: true });
  const hash = createHash("sha256");
  let bytes = 0;
  const hasher = new Transform({
    transform(chunk: Buffer, _encoding, done) {
      hash.update(chunk);
      bytes += chunk.length;
      done(null, chunk);
    },
  });
  await pipeline(createReadStream(from), hasher, createWriteStream(to, { flags: "wx" }));
  return { sha256: hash.digest("hex"), bytes };
}

async function sha256Of(path: string): Promise<string> {
  const hash = createHash("sha256");
  for await (const chunk of createReadStream(path)) hash.update(chunk as Buffer);
  return hash.digest("hex");
}

function countRows(db: Database.Database, table: string): number {
  return (db.prepare(`SELECT count(*) AS n FROM "${table}"`).get() as { n: number }).n;
}

/**
 * An online backup of a data directory, safe while the server runs and ingests:
 *  1. `VACUUM INTO` writes a consistent snapshot of the database (every committed row, whether it is still in
 *     the WAL or already in the main file; an ingest's uncommitted transaction is not in it) to a new file,
 *     without stopping readers or writers.
 *  2. The raw file of every upload in that snapshot is copied and checked against its sha256 (raw files are
 *     content-addressed and never change; a file is stored before its upload row is written, so each exists).
 *  3. manifest.json records the counts; the folder is written as <name>.partial and renamed when complete, so a
 *     backup that was interrupted is never mistaken for a whole one.
 * Returns the backup folder and its manifest.
 */
export async function backupDataDir(dataDir: string, backupRoot: string, now = new Date()): Promise<{ folder: string; manifest: BackupManifest }> {
  const sourceDb = join(dataDir, DATABASE_FILE);
  if (!existsSync(sourceDb)) throw new Error(`There is no Calmcrest database at ${sourceDb}. Set CALMCREST_DATA_DIR to the data directory the server uses.`);
  const folder = join(resolve(backupRoot), backupFolderName(now));
  const partial = `${folder}.partial`;
  if (existsSync(folder)) throw new Error(`The backup folder ${folder} exists already. Wait a second and run the backup again.`);
  rmSync(partial, { recursive: true, force: true });
  mkdirSync(partial, { recursive: true });
  try {
    const backupDb = join(partial, DATABASE_FILE);
    const source = new Database(sourceDb, { fileMustExist: true });
    try {
      // A reader never waits for an ingest in WAL mode; the wait only covers a checkpoint's brief lock.
      source.pragma("busy_timeout = 10000");
      source.prepare("VACUUM INTO ?").run(backupDb);
    } finally {
      source.close();
    }

    const snapshot = new Database(backupDb, { readonly: true, fileMustExist: true });
    let shas: string[];
    let uploads: number;
    let samples: number;
    try {
      shas = (snapshot.prepare("SELECT DISTINCT sha256 FROM upload ORDER BY sha256").pluck().all() as string[]).map((sha) => sha.toLowerCase());
      uploads = countRows(snapshot, "upload");
      samples = countRows(snapshot, "sample");
    } finally {
      snapshot.close();
    }

    let rawBytes = 0;
    for (const sha of shas) {
      const from = rawFilePath(dataDir, sha);
      if (!existsSync(from)) throw new Error(`The raw file of an upload is missing from the data directory: ${from}. The backup was not completed.`);
      const copied = await copyHashing(from, rawFilePath(partial, sha));
      if (copied.sha256 !== sha) throw new Error(`The stored raw file ${from} does not match its sha256 (the disk copy is damaged). The backup was not completed.`);
      rawBytes += copied.bytes;
    }

    const manifest: BackupManifest = {
      format: BACKUP_FORMAT,
      createdAt: now.toISOString(),
      source: resolve(dataDir),
      database: { file: DATABASE_FILE, bytes: statSync(backupDb).size, sha256: await sha256Of(backupDb) },
      uploads,
      samples,
      rawFiles: { count: shas.length, bytes: rawBytes },
    };
    writeFileSync(join(partial, MANIFEST_FILE), `${JSON.stringify(manifest, null, 2)}\n`);
    renameSync(partial, folder);
    return { folder, manifest };
  } catch (error) {
    rmSync(partial, { recursive: true, force: true });
    throw error;
  }
}

function readManifest(folder: string): BackupManifest {
  const path = join(folder, MANIFEST_FILE);
  if (!existsSync(path)) {
    throw new Error(`${folder} is not a Calmcrest backup (it has no ${MANIFEST_FILE}). Give the folder that \`npm run backup\` printed, e.g. backups/calmcrest-backup-2026-12-03T02-00-00Z.`);
  }
  const manifest = JSON.parse(readFileSync(path, "utf8")) as BackupManifest;
  if (manifest.format !== BACKUP_FORMAT) throw new Error(`The backup in ${folder} has format ${String(manifest.format)}; this Calmcrest restores format ${BACKUP_FORMAT}.`);
  return manifest;
}

/**
 * Restores a backup folder into an empty (or not yet existing) data directory, checking the database's and every
 * raw file's sha256 and the database's integrity. Refuses a data directory that has anything in it: restoring
 * never overwrites data. Start the server on the restored directory afterwards.
 */
export async function restoreBackup(folder: string, dataDir: string): Promise<BackupManifest> {
  const source = resolve(folder);
  if (!existsSync(source) || !statSync(source).isDirectory()) throw new Error(`There is no backup folder at ${source}.`);
  const manifest = readManifest(source);
  const target = resolve(dataDir);
  if (existsSync(target) && readdirSync(target).length > 0) {
    throw new Error(
      `The data directory ${target} is not empty, and a restore never overwrites data. Stop the server, move that directory aside (or set CALMCREST_DATA_DIR to a new, empty directory), and run the restore again.`,
    );
  }
  const backupDb = join(source, manifest.database.file);
  if ((await sha256Of(backupDb)) !== manifest.database.sha256) throw new Error(`The database in ${source} does not match its manifest (the backup is damaged). Nothing was restored.`);
  mkdirSync(target, { recursive: true });
  try {
    await copyHashing(backupDb, join(target, DATABASE_FILE));
    const db = new Database(join(target, DATABASE_FILE), { fileMustExist: true });
    let shas: string[];
    try {
      const check = db.pragma("integrity_check", { simple: true });
      if (check !== "ok") throw new Error(`The restored database fails SQLite's integrity check (${String(check)}). Nothing was restored.`);
      shas = (db.prepare("SELECT DISTINCT sha256 FROM upload").pluck().all() as string[]).map((sha) => sha.toLowerCase());
    } finally {
      db.close();
    }
    for (const sha of shas) {
      const from = rawFilePath(source, sha);
      if (!existsSync(from)) throw new Error(`The backup lacks the raw file ${from} of an upload. Nothing was restored.`);
      const copied = await copyHashing(from, rawFilePath(target, sha));
      if (copied.sha256 !== sha) throw new Error(`The raw file ${from} in the backup does not match its sha256 (the backup is damaged). Nothing was restored.`);
    }
    return manifest;
  } catch (error) {
    // Leave the directory as empty as it was found.
    for (const entry of readdirSync(target)) rmSync(join(target, entry), { recursive: true, force: true });
    throw error;
  }
}
