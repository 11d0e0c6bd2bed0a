import path from 'node:path';
import { Router, type Request } from 'express';
import {
  imageCorrectionsSchema,
  imageIdParamsSchema,
  listImagesQuerySchema,
  pixelsQuerySchema,
  previewQuerySchema,
  regionStatsRequestSchema,
  UPLOAD_OUTCOMES,
  uploadFieldsSchema,
  type UploadResponseDto,
} from '../../shared/schemas/image.schema.ts';
import type { AppConfig } from '../config/env.ts';
import { fromRoot } from '../config/paths.ts';
import { notFound, validationFailed } from '../errors.ts';
import {
  authorize,
  currentUser,
  requireRole,
} from '../middleware/authenticate.ts';
import { uploadFiles } from '../middleware/upload.ts';
import { canCorrectImage, canReadImage } from '../policies/image.policy.ts';
import {
  assertOpenForChanges,
  canEditStudy,
  canViewStudy,
} from '../policies/study.policy.ts';
import {
  presentImage,
  presentImageDetail,
} from '../presenters/image.presenter.ts';
import {
  discardUploads,
  ingestUploads,
} from '../services/image-ingest.service.ts';
import {
  createPixelCache,
  decimatePixels,
  pixelBytes,
  pixelTypeName,
  statisticsOfRegions,
} from '../services/image-pixels.service.ts';
import {
  createPreviewCache,
  previewKey,
} from '../services/image-preview.service.ts';
import { createDiskImageStore } from '../services/image-storage.service.ts';
import {
  correctImage,
  findImageById,
  findStudyFacts,
  imageFacts,
  listImagesOfStudy,
} from '../services/image.service.ts';

/** Memory for decoded pixels kept between requests (about 14 images of 3000²). */
const PIXEL_CACHE_BYTES = 256 * 1024 * 1024;
const IMMUTABLE = 'private, max-age=31536000, immutable';

const auditOf = (req: Request) => ({
  actorId: currentUser(req).id,
  ipAddress: req.ip ?? null,
});

/** Loads the image of `:id`; 404 when the viewer may not see it. */
async function readableImage(req: Request) {
  const { id } = imageIdParamsSchema.parse(req.params);
  const image = await findImageById(id);
  const facts = await imageFacts(image);
  if (!canReadImage(currentUser(req), facts)) throw notFound('image');
  return { image, facts };
}

/** The study images are added to; 404 unseen, 403 by role, 409 by state. */
async function studyOpenFor(req: Request, studyId: number) {
  const study = await findStudyFacts(studyId);
  const viewer = currentUser(req);
  if (!study || !canViewStudy(viewer, study)) throw notFound('study');
  authorize(
    canEditStudy(viewer, study),
    'Residents add images only to studies they created.',
  );
  assertOpenForChanges(study.status);
}

const matches = (req: Request, etag: string): boolean =>
  (req.get('if-none-match') ?? '')
    .split(',')
    .some((tag) => tag.trim() === etag);

/**
 * Stored DICOM images: upload (one result per file), facts, corrections,
 * previews, pixels and region statistics.
 */
export function imagesRouter(config: AppConfig): Router {
  const uploadsDir = fromRoot(config.uploadsDir);
  const store = createDiskImageStore(uploadsDir);
  const pixels = createPixelCache(store, PIXEL_CACHE_BYTES);
  const previews = createPreviewCache(
    path.join(uploadsDir, 'previews'),
    pixels,
  );
  const router = Router();

  router.post(
    '/',
    requireRole('physicist', 'resident'),
    uploadFiles(store.tempDir, config),
    async (req, res) => {
      const files = (req.files as Express.Multer.File[] | undefined) ?? [];
      const uploads = files.map((f) => ({
        originalName: f.originalname,
        tempPath: f.path,
      }));
      try {
        const viewer = currentUser(req);
        const { studyId } = uploadFieldsSchema.parse(req.body);
        if (studyId !== undefined) await studyOpenFor(req, studyId);
        if (uploads.length === 0) {
          throw validationFailed(
            [{ path: 'files', message: 'Choose at least one file.' }],
            'No files were sent.',
          );
        }
        const results = await ingestUploads(uploads, {
          audit: auditOf(req),
          studyId: studyId ?? null,
          store,
          maxFileBytes: config.maxFileBytes,
          maxFilesPerRequest: config.maxFilesPerRequest,
        });
        const body: UploadResponseDto = {
          results: await Promise.all(
            results.map(async ({ image, ...result }) =>
              image
                ? {
                    ...result,
                    imageId: image.id,
                    image: presentImage(image, viewer, await imageFacts(image)),
                  }
                : result,
            ),
          ),
          counts: Object.fromEntries(
            UPLOAD_OUTCOMES.map((o) => [
              o,
              results.filter((r) => r.outcome === o).length,
            ]),
          ) as UploadResponseDto['counts'],
        };
        res.json({ data: body });
      } finally {
        await discardUploads(uploads);
      }
    },
  );

  router.get('/', async (req, res) => {
    const { studyId } = listImagesQuerySchema.parse(req.query);
    const viewer = currentUser(req);
    const study = await findStudyFacts(studyId);
    if (!study || !canViewStudy(viewer, study)) throw notFound('study');
    const images = await listImagesOfStudy(studyId);
    res.json({
      data: images.map((i) =>
        presentImage(i, viewer, { uploadedBy: i.uploadedBy, study }),
      ),
    });
  });

  router.get('/:id', async (req, res) => {
    const { image, facts } = await readableImage(req);
    res.json({ data: presentImageDetail(image, currentUser(req), facts) });
  });

  router.patch('/:id/corrections', async (req, res) => {
    const { image, facts } = await readableImage(req);
    const input = imageCorrectionsSchema.parse(req.body);
    authorize(
      canCorrectImage(currentUser(req), facts),
      'Corrections are made by those who may edit the image’s study.',
    );
    if (facts.study) assertOpenForChanges(facts.study.status);
    const corrected = await correctImage(image.id, input, auditOf(req));
    res.json({ data: presentImageDetail(corrected, currentUser(req), facts) });
  });

  router.get('/:id/preview', async (req, res) => {
    const { image } = await readableImage(req);
    const query = previewQuerySchema.parse(req.query);
    const key = previewKey(image, query);
    res.set('ETag', key.etag);
    res.set(
      'Cache-Control',
      key.isDefaultWindow ? IMMUTABLE : 'private, max-age=86400',
    );
    if (matches(req, key.etag)) {
      res.status(304).end();
      return;
    }
    res.type('png').send(await previews.get(image, query));
  });

  router.get('/:id/pixels', async (req, res) => {
    const { image } = await readableImage(req);
    const { decimate } = pixelsQuerySchema.parse(req.query);
    const etag = `"${image.sha256}-pixels-${decimate}"`;
    res.set('ETag', etag);
    res.set('Cache-Control', IMMUTABLE);
    if (matches(req, etag)) {
      res.status(304).end();
      return;
    }
    const decoded = await pixels.get(image);
    const out = decimatePixels(
      decoded.pixels,
      decoded.rows,
      decoded.columns,
      decimate,
    );
    res.set({
      'X-Rows': String(out.rows),
      'X-Columns': String(out.columns),
      'X-Pixel-Type': pixelTypeName(out.pixels),
      'X-Decimation': String(decimate),
    });
    res.type('application/octet-stream').send(pixelBytes(out.pixels));
  });

  router.post('/:id/region-stats', async (req, res) => {
    const { image } = await readableImage(req);
    const input = regionStatsRequestSchema.parse(req.body);
    const decoded = await pixels.get(image);
    res.json({
      data: statisticsOfRegions(decoded, input.regions, input.percentiles),
    });
  });

  return router;
}
