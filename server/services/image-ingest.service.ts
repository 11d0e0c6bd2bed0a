import { createHash } from 'node:crypto';
import { readFile, rm } from 'node:fs/promises';
import { UniqueConstraintError } from 'sequelize';
import type { InferCreationAttributes } from 'sequelize';
import { DomainError } from '../../shared/errors.ts';
import type { UploadOutcome } from '../../shared/schemas/image.schema.ts';
import { sequelize } from '../db/sequelize.ts';
import { decodeDicom, type DecodedImage } from '../dicom/decode-dicom.ts';
import { Image } from '../models/image.model.ts';
import { archiveMembers, isZipArchive } from './image-archive.service.ts';
import type { ImageStore } from './image-storage.service.ts';
import { recordAudit, type AuditContext } from './audit.service.ts';

/** One file as multer left it in the temp folder. */
export interface UploadedFile {
  originalName: string;
  tempPath: string;
}

/** Who uploads, into which study, and the limits that apply. */
export interface IngestContext {
  audit: AuditContext & { actorId: number };
  studyId: number | null;
  store: ImageStore;
  maxFileBytes: number;
  maxFilesPerRequest: number;
}

/** The outcome of one file or zip member; `image` for stored and duplicate. */
export interface IngestResult {
  name: string;
  outcome: UploadOutcome;
  image?: Image;
  code?: string;
  message?: string;
}

const sha256Of = (bytes: Uint8Array): string =>
  createHash('sha256').update(bytes).digest('hex');

/** The columns of an image row, from what the decoder read. */
export function imageColumnsFrom(
  decoded: DecodedImage,
): Omit<
  InferCreationAttributes<Image>,
  | 'id'
  | 'studyId'
  | 'uploadedBy'
  | 'sha256'
  | 'originalName'
  | 'storageKey'
  | 'sizeBytes'
  | 'corrections'
  | 'createdAt'
  | 'updatedAt'
> {
  const { imagerPixelSpacingMm, pixelSpacingMm, ...a } = decoded.acquisition;
  return {
    ...a,
    rows: decoded.rows,
    columns: decoded.columns,
    frames: decoded.frames,
    transferSyntaxUid: decoded.transferSyntaxUid,
    photometricInterpretation: decoded.photometricInterpretation,
    bitsAllocated: decoded.bitsAllocated,
    bitsStored: decoded.bitsStored,
    pixelRepresentation: decoded.pixelRepresentation,
    samplesPerPixel: decoded.samplesPerPixel,
    rescaleSlope: decoded.rescaleSlope,
    rescaleIntercept: decoded.rescaleIntercept,
    spacingRowMm: decoded.pixelSpacing?.rowMm ?? null,
    spacingColumnMm: decoded.pixelSpacing?.columnMm ?? null,
    spacingSource: decoded.pixelSpacing?.source ?? null,
    imagerPixelSpacingRowMm: imagerPixelSpacingMm?.rowMm ?? null,
    imagerPixelSpacingColumnMm: imagerPixelSpacingMm?.columnMm ?? null,
    pixelSpacingRowMm: pixelSpacingMm?.rowMm ?? null,
    pixelSpacingColumnMm: pixelSpacingMm?.columnMm ?? null,
    header: decoded.header,
    warnings: decoded.warnings,
  };
}

async function duplicateOf(
  sha256: string,
  sopInstanceUid: string | null,
): Promise<{ image: Image; why: string } | null> {
  const sameBytes = await Image.findOne({ where: { sha256 } });
  if (sameBytes) {
    return { image: sameBytes, why: 'The same file is already stored' };
  }
  if (!sopInstanceUid) return null;
  const sameUid = await Image.findOne({ where: { sopInstanceUid } });
  return sameUid
    ? {
        image: sameUid,
        why: 'An image with the same SOP Instance UID (but different bytes) is already stored',
      }
    : null;
}

const duplicateResult = (
  name: string,
  found: { image: Image; why: string },
): IngestResult => ({
  name,
  outcome: 'duplicate',
  image: found.image,
  message: `${found.why} as image ${found.image.id} (${found.image.originalName}); it was not stored again.`,
});

/**
 * Stores one DICOM file, all or nothing: it is hashed, decoded (frame 0) to
 * validate it and read its facts, checked against stored images by hash and
 * SOP Instance UID, then its row and audit entry are inserted in a
 * transaction, and only after the insert succeeds is the file renamed into
 * the store (still inside the transaction). If the rename or the commit
 * fails, the stored file is deleted, so no file is left without a row.
 *
 * A second upload of the same file racing this one waits on the unique
 * index and then reports a duplicate; it never renames over the file.
 * (A crash between rename and commit can leave an unreferenced file, never
 * a row without its file.)
 *
 * @returns stored (with the new image), duplicate (with the existing one)
 *   or rejected with the decoder's code and message.
 * @throws only for failures outside the file itself (database down, disk
 *   full); the caller reports them per file.
 */
export async function ingestFile(
  file: UploadedFile & { name: string },
  ctx: IngestContext,
): Promise<IngestResult> {
  const bytes = await readFile(file.tempPath);
  const sha256 = sha256Of(bytes);
  const sameBytes = await duplicateOf(sha256, null);
  if (sameBytes) return duplicateResult(file.name, sameBytes);

  let decoded: DecodedImage;
  try {
    decoded = await decodeDicom(bytes, { frame: 0 });
  } catch (error) {
    if (error instanceof DomainError) {
      return {
        name: file.name,
        outcome: 'rejected',
        code: error.code,
        message: error.message,
      };
    }
    throw error;
  }
  const sopInstanceUid = decoded.acquisition.sopInstanceUid;
  const sameImage = await duplicateOf(sha256, sopInstanceUid);
  if (sameImage) return duplicateResult(file.name, sameImage);

  // Set just before the rename: from then on a failure must delete the
  // target, which no committed row can own (the insert above holds the
  // digest's unique index).
  let renameAttempted = false;
  try {
    const image = await sequelize.transaction(async (transaction) => {
      const created = await Image.create(
        {
          ...imageColumnsFrom(decoded),
          studyId: ctx.studyId,
          uploadedBy: ctx.audit.actorId,
          sha256,
          originalName: file.originalName,
          storageKey: ctx.store.keyFor(sha256),
          sizeBytes: bytes.byteLength,
        },
        { transaction },
      );
      await recordAudit(
        ctx.audit,
        {
          action: 'image.uploaded',
          targetType: 'image',
          targetId: created.id,
          details: { sha256, name: file.name, studyId: ctx.studyId },
        },
        transaction,
      );
      renameAttempted = true;
      await ctx.store.put(file.tempPath, sha256);
      return created;
    });
    return { name: file.name, outcome: 'stored', image };
  } catch (error) {
    if (renameAttempted) await ctx.store.delete(ctx.store.keyFor(sha256));
    if (error instanceof UniqueConstraintError) {
      const raced = await duplicateOf(sha256, sopInstanceUid);
      if (raced) return duplicateResult(file.name, raced);
    }
    throw error;
  }
}

async function safely(
  name: string,
  work: () => Promise<IngestResult>,
): Promise<IngestResult> {
  try {
    return await work();
  } catch (error) {
    console.error(`ingest of ${name} failed:`, error);
    return {
      name,
      outcome: 'rejected',
      code: 'internal_error',
      message:
        'The server could not store this file; nothing of it was kept. Try it again.',
    };
  }
}

/** Removes uploaded temp files; those already moved into the store are gone. */
export async function discardUploads(files: UploadedFile[]): Promise<void> {
  await Promise.all(files.map((f) => rm(f.tempPath, { force: true })));
}

/**
 * Ingests every uploaded file in order, opening zip archives member by
 * member. One file's failure never affects another's result. Temp files are
 * removed whatever happens.
 *
 * @returns one result per file or zip member (folders inside a zip give
 *   none), in upload order.
 */
export async function ingestUploads(
  files: UploadedFile[],
  ctx: IngestContext,
): Promise<IngestResult[]> {
  const results: IngestResult[] = [];
  let offered = 0;
  const overLimit = (name: string): IngestResult => ({
    name,
    outcome: 'rejected',
    code: 'payload_too_large',
    message: `Only ${ctx.maxFilesPerRequest} files are taken per upload; send this one again on its own.`,
  });
  const ingestOne = async (
    name: string,
    originalName: string,
    tempPath: string,
  ) => {
    offered += 1;
    results.push(
      offered > ctx.maxFilesPerRequest
        ? overLimit(name)
        : await safely(name, () =>
            ingestFile({ name, originalName, tempPath }, ctx),
          ),
    );
  };
  try {
    for (const file of files) {
      if (!(await isZipArchive(file.tempPath))) {
        await ingestOne(file.originalName, file.originalName, file.tempPath);
        continue;
      }
      try {
        for await (const member of archiveMembers(
          file.tempPath,
          file.originalName,
          ctx.store.tempDir,
          ctx.maxFileBytes,
        )) {
          if (member.kind === 'file') {
            try {
              const base = member.name.split('/').pop() ?? member.name;
              await ingestOne(member.name, base, member.tempPath);
            } finally {
              await rm(member.tempPath, { force: true });
            }
          } else if (member.kind === 'skipped') {
            results.push({
              name: member.name,
              outcome: 'skipped',
              message: member.message,
            });
          } else {
            const { name, code, message } = member;
            results.push({ name, outcome: 'rejected', code, message });
          }
        }
      } catch (error) {
        results.push({
          name: file.originalName,
          outcome: 'rejected',
          code: 'file_unreadable',
          message: `The zip archive cannot be read: ${(error as Error).message}.`,
        });
      }
    }
  } finally {
    await discardUploads(files);
  }
  return results;
}
