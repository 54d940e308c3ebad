import { createHash, randomUUID } from "node:crypto";
import { createReadStream, createWriteStream, existsSync, mkdirSync } from "node:fs";
import { rename, unlink } from "node:fs/promises";
import { join } from "node:path";
import { pipeline } from "node:stream/promises";
import { Transform } from "node:stream";
import type { Request } from "express";
import type { StorageEngine } from "multer";

/** Where the raw bytes of an upload live: content-addressed, so the same bytes are stored once. */
export function rawFilePath(dataDir: string, sha256: string): string {
  return join(dataDir, "uploads", sha256.slice(0, 2), sha256);
}

export function tmpDir(dataDir: string): string {
  return join(dataDir, "tmp");
}

/** What the storage engine adds to multer's file object. */
export interface HashedFile {
  path: string;
  size: number;
  sha256: string;
}

/**
 * Streams `source` into a new file under <dataDir>/tmp while computing its sha256 and size, so the bytes are read
 * once. A failed copy leaves no partial file behind.
 */
async function copyHashed(dataDir: string, source: NodeJS.ReadableStream): Promise<HashedFile> {
  mkdirSync(tmpDir(dataDir), { recursive: true });
  const path = join(tmpDir(dataDir), `${Date.now()}-${randomUUID()}.part`);
  const hash = createHash("sha256");
  let size = 0;
  const hasher = new Transform({
    transform(chunk: Buffer, _encoding, done) {
      hash.update(chunk);
      size += chunk.length;
      done(null, chunk);
    },
  });
  try {
    await pipeline(source, hasher, createWriteStream(path));
  } catch (error) {
    await unlink(path).catch(() => undefined);
    throw error;
  }
  return { path, size, sha256: hash.digest("hex") };
}

/**
 * A multer storage engine that writes the incoming file to <dataDir>/tmp while computing its sha256.
 * The caller moves it to its content address with `storeRawFile`.
 */
export function hashingDiskStorage(dataDir: string): StorageEngine {
  return {
    _handleFile(_req: Request, file, callback) {
      copyHashed(dataDir, file.stream).then(
        (hashed) => callback(null, hashed),
        (error: unknown) => callback(error instanceof Error ? error : new Error(String(error))),
      );
    },
    _removeFile(_req: Request, file, callback) {
      unlink(file.path).then(
        () => callback(null),
        () => callback(null),
      );
    },
  };
}

/** Moves a hashed temporary file to its content address (or drops it when those bytes are stored already). */
export async function storeRawFile(dataDir: string, file: HashedFile): Promise<string> {
  const target = rawFilePath(dataDir, file.sha256);
  if (existsSync(target)) {
    await unlink(file.path);
    return target;
  }
  mkdirSync(join(dataDir, "uploads", file.sha256.slice(0, 2)), { recursive: true });
  // Same file system (both under the data directory), so rename is atomic: a crash leaves either no file or all of it.
  await rename(file.path, target);
  return target;
}

export async function discardTemporary(file: HashedFile | undefined): Promise<void> {
  if (file) await unlink(file.path).catch(() => undefined);
}

/** Copies a file on disk into <dataDir>/tmp while hashing it, as if it had been uploaded (used by the demo seed). */
export function hashIntoTemporary(dataDir: string, sourcePath: string): Promise<HashedFile> {
  return copyHashed(dataDir, createReadStream(sourcePath));
}
