import { createReadStream } from 'node:fs';
import { mkdir, open, readFile, rename, rm, stat } from 'node:fs/promises';
import path from 'node:path';
import type { Readable } from 'node:stream';

/**
 * Where stored DICOM files live. Keys are relative paths such as
 * `images/ab/ab12….dcm`, so the same interface could front an object store.
 */
export interface ImageStore {
  /** The key a file with this SHA-256 (lowercase hex) is stored under. */
  keyFor(sha256: string): string;
  /**
   * Moves a finished temporary file into the store under a key derived from
   * its SHA-256, durably: the file is fsynced, renamed (atomic on one file
   * system) and its folder fsynced, so a crash leaves either no file or the
   * whole file.
   * @param tempPath a file inside {@link ImageStore.tempDir}.
   * @param sha256 lowercase hex digest of the file's bytes.
   * @returns the key under which the file is now stored, `keyFor(sha256)`.
   */
  put(tempPath: string, sha256: string): Promise<string>;
  /** A stream of a stored file's bytes. */
  open(key: string): Readable;
  /** A stored file's bytes. */
  read(key: string): Promise<Buffer>;
  /** Removes a stored file; a missing file is not an error. */
  delete(key: string): Promise<void>;
  /** True when a file is stored under the key. */
  exists(key: string): Promise<boolean>;
  /** A folder for upload temp files, on the same file system as the store. */
  readonly tempDir: string;
}

const imageKeyFor = (sha256: string): string => {
  if (!/^[0-9a-f]{64}$/.test(sha256)) {
    throw new Error(`not a SHA-256 digest: ${sha256}`);
  }
  return `images/${sha256.slice(0, 2)}/${sha256}.dcm`;
};

async function fsyncPath(target: string): Promise<void> {
  const handle = await open(target, 'r');
  try {
    await handle.sync();
  } finally {
    await handle.close();
  }
}

/**
 * An {@link ImageStore} on the local disk under `rootDir` (the configured
 * uploads folder, outside the web root). Temp files go to `rootDir/tmp` so
 * the final rename never crosses file systems.
 */
export function createDiskImageStore(rootDir: string): ImageStore {
  const root = path.resolve(rootDir);
  const resolveKey = (key: string): string => {
    const full = path.resolve(root, key);
    // Keys come from our own database, but a key must never leave the store.
    if (!full.startsWith(`${root}${path.sep}`)) {
      throw new Error(`storage key outside the store: ${key}`);
    }
    return full;
  };
  return {
    tempDir: path.join(root, 'tmp'),
    keyFor: imageKeyFor,
    async put(tempPath, sha256) {
      const key = imageKeyFor(sha256);
      const target = resolveKey(key);
      await fsyncPath(tempPath);
      await mkdir(path.dirname(target), { recursive: true });
      await rename(tempPath, target);
      await fsyncPath(path.dirname(target));
      return key;
    },
    open: (key) => createReadStream(resolveKey(key)),
    read: (key) => readFile(resolveKey(key)),
    async delete(key) {
      await rm(resolveKey(key), { force: true });
    },
    async exists(key) {
      try {
        return (await stat(resolveKey(key))).isFile();
      } catch {
        return false;
      }
    },
  };
}
