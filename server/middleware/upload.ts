import { randomUUID } from 'node:crypto';
import { mkdirSync } from 'node:fs';
import type { RequestHandler } from 'express';
import multer from 'multer';

/** Limits of one upload request, from the app config. */
export interface UploadLimits {
  maxFileBytes: number;
  maxFilesPerRequest: number;
}

/**
 * Multipart parser for `files` (many) plus small text fields. Files are
 * streamed to random names in `tempDir` (inside the uploads folder, so the
 * later rename into the store is atomic); none is held in memory. An
 * oversize file or too many files abort the whole request with a
 * MulterError, which the error handler answers with 413, and multer removes
 * the temp files it had written.
 */
export function uploadFiles(
  tempDir: string,
  limits: UploadLimits,
): RequestHandler {
  mkdirSync(tempDir, { recursive: true });
  return multer({
    storage: multer.diskStorage({
      destination: tempDir,
      filename: (_req, _file, done) => done(null, `upload-${randomUUID()}`),
    }),
    limits: {
      fileSize: limits.maxFileBytes,
      files: limits.maxFilesPerRequest,
      fields: 10,
      fieldSize: 1024,
    },
  }).array('files', limits.maxFilesPerRequest);
}
