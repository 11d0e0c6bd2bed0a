import { randomUUID } from 'node:crypto';
import { createWriteStream } from 'node:fs';
import { open, rm } from 'node:fs/promises';
import path from 'node:path';
import { Transform } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import yauzl, { type Entry, type ZipFile } from 'yauzl';

/** One member of a zip, as the ingest sees it. */
export type ArchiveMember =
  | { kind: 'file'; name: string; tempPath: string }
  | { kind: 'skipped'; name: string; message: string }
  | { kind: 'rejected'; name: string; code: string; message: string };

const ZIP_LOCAL_HEADER = [0x50, 0x4b, 0x03, 0x04];
const ZIP_EMPTY_END = [0x50, 0x4b, 0x05, 0x06];

/**
 * True when a file is a zip archive rather than a DICOM file: it starts with
 * a zip signature and has no "DICM" marker after the 128-byte preamble (a
 * DICOM preamble may hold anything, including those four bytes).
 */
export async function isZipArchive(file: string): Promise<boolean> {
  const handle = await open(file, 'r');
  try {
    const head = Buffer.alloc(132);
    const { bytesRead } = await handle.read(head, 0, 132, 0);
    if (bytesRead >= 132 && head.toString('latin1', 128, 132) === 'DICM') {
      return false;
    }
    const starts = (sig: number[]) =>
      bytesRead >= 4 && sig.every((b, i) => head[i] === b);
    return starts(ZIP_LOCAL_HEADER) || starts(ZIP_EMPTY_END);
  } finally {
    await handle.close();
  }
}

function nextEntry(zip: ZipFile): Promise<Entry | null> {
  return new Promise((resolve, reject) => {
    const cleanup = () => {
      zip.off('entry', onEntry);
      zip.off('end', onEnd);
      zip.off('error', onError);
    };
    const onEntry = (entry: Entry) => {
      cleanup();
      resolve(entry);
    };
    const onEnd = () => {
      cleanup();
      resolve(null);
    };
    const onError = (error: Error) => {
      cleanup();
      reject(error);
    };
    zip.on('entry', onEntry);
    zip.on('end', onEnd);
    zip.on('error', onError);
    zip.readEntry();
  });
}

/** Why a member is not offered to the decoder, or null to offer it. */
function skipReason(memberPath: string): string | null {
  const base = path.posix.basename(memberPath);
  if (base.toUpperCase() === 'DICOMDIR') {
    return 'DICOMDIR is the index of the exported folder, not an image.';
  }
  if (memberPath.split('/').some((part) => part.startsWith('.'))) {
    return 'Hidden files are not images.';
  }
  if (memberPath.startsWith('__MACOSX/')) {
    return 'Resource-fork copies made by the archiver are not images.';
  }
  return null;
}

class SizeGuard extends Transform {
  private seen = 0;

  constructor(private readonly maxBytes: number) {
    super();
  }

  override _transform(
    chunk: Buffer,
    _encoding: BufferEncoding,
    done: (error?: Error | null, data?: Buffer) => void,
  ): void {
    this.seen += chunk.length;
    if (this.seen > this.maxBytes) {
      done(new SizeLimitError());
      return;
    }
    done(null, chunk);
  }
}

class SizeLimitError extends Error {}

/**
 * Streams the members of a zip archive to temp files, one at a time, so the
 * caller ingests each before the next is inflated. Folders are passed over;
 * DICOMDIR and hidden files come back as skipped; encrypted members, members
 * larger than `maxFileBytes` and a nested zip come back as rejected. The
 * caller owns (and removes) each yielded temp file. Member names are never
 * used as paths on disk.
 *
 * @param zipPath the uploaded archive.
 * @param displayName the archive's name, prefixed to member names.
 * @param tempDir folder for the extracted members.
 * @param maxFileBytes largest uncompressed member accepted, in bytes.
 * @throws Error when the archive itself cannot be read.
 */
export async function* archiveMembers(
  zipPath: string,
  displayName: string,
  tempDir: string,
  maxFileBytes: number,
): AsyncGenerator<ArchiveMember> {
  const zip = await yauzl.openPromise(zipPath, {
    autoClose: false,
    validateEntrySizes: true,
    strictFileNames: false,
  });
  try {
    for (
      let entry = await nextEntry(zip);
      entry;
      entry = await nextEntry(zip)
    ) {
      const memberPath = entry.fileName.replace(/\\/g, '/');
      const name = `${displayName}/${memberPath}`;
      if (memberPath.endsWith('/')) continue;
      const skip = skipReason(memberPath);
      if (skip) {
        yield { kind: 'skipped', name, message: skip };
        continue;
      }
      if (entry.isEncrypted()) {
        yield {
          kind: 'rejected',
          name,
          code: 'file_unreadable',
          message:
            'The member is encrypted; export the folder without a password.',
        };
        continue;
      }
      if (entry.uncompressedSize > maxFileBytes) {
        yield {
          kind: 'rejected',
          name,
          code: 'payload_too_large',
          message: `The member is ${entry.uncompressedSize} bytes, over the limit of ${maxFileBytes} bytes per file.`,
        };
        continue;
      }
      const tempPath = path.join(tempDir, `member-${randomUUID()}`);
      try {
        const stream = await zip.openReadStreamPromise(entry);
        await pipeline(
          stream,
          new SizeGuard(maxFileBytes),
          createWriteStream(tempPath),
        );
      } catch (error) {
        await rm(tempPath, { force: true });
        yield {
          kind: 'rejected',
          name,
          code:
            error instanceof SizeLimitError
              ? 'payload_too_large'
              : 'file_unreadable',
          message:
            error instanceof SizeLimitError
              ? `The member is over the limit of ${maxFileBytes} bytes per file.`
              : `The member cannot be extracted: ${(error as Error).message}.`,
        };
        continue;
      }
      if (await isZipArchive(tempPath)) {
        await rm(tempPath, { force: true });
        yield {
          kind: 'rejected',
          name,
          code: 'not_dicom',
          message: 'A zip inside the zip is not opened; upload it on its own.',
        };
        continue;
      }
      yield { kind: 'file', name, tempPath };
    }
  } finally {
    zip.close();
  }
}
