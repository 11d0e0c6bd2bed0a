import { Router, type Request } from 'express';
import type { Actor } from '../../shared/permissions.ts';
import { imageIdParamsSchema } from '../../shared/schemas/image.schema.ts';
import {
  applyLayoutSchema,
  findObjectsSchema,
  layoutIdParamsSchema,
  saveLayoutSchema,
  setImageRegionsSchema,
  setStudyLayoutSchema,
  type ApplyLayoutResultDto,
  type ImageRegionsDto,
  type StudyLayoutDto,
} from '../../shared/schemas/layout.schema.ts';
import { studyIdParamsSchema } from '../../shared/schemas/study.schema.ts';
import { isOpenForChanges } from '../../shared/studies/study-state.ts';
import type { AppConfig } from '../config/env.ts';
import { fromRoot } from '../config/paths.ts';
import { notFound } from '../errors.ts';
import {
  authenticate,
  authorize,
  currentUser,
  requireRole,
} from '../middleware/authenticate.ts';
import type { ImageRegion } from '../models/image-region.model.ts';
import type { Image } from '../models/image.model.ts';
import type { RegionLayoutRecord } from '../models/region-layout.model.ts';
import type { Study } from '../models/study.model.ts';
import { User } from '../models/user.model.ts';
import { canReadImage } from '../policies/image.policy.ts';
import {
  canEditLayout,
  canReadLayoutLibrary,
  canSaveLayout,
} from '../policies/layout.policy.ts';
import { canEditStudy } from '../policies/study.policy.ts';
import {
  presentLayout,
  presentPlacement,
} from '../presenters/layout.presenter.ts';
import { createPixelCache } from '../services/image-pixels.service.ts';
import { createDiskImageStore } from '../services/image-storage.service.ts';
import { findImageById, imageFacts } from '../services/image.service.ts';
import {
  applyStudyLayout,
  findObjectsInImage,
  imageRegionsOf,
  placedLayoutFor,
  setImageRegions,
  spacingOf,
} from '../services/image-region.service.ts';
import {
  createLibraryLayout,
  deleteLibraryLayout,
  findLibraryLayout,
  findStudyLayout,
  listLibraryLayouts,
  listPlacements,
  setStudyLayout,
  updateLibraryLayout,
} from '../services/region-layout.service.ts';
import { findStudyFor } from '../services/study.service.ts';

/** Decoded images kept for object finding and automatic shifts. */
const PIXEL_CACHE_BYTES = 128 * 1024 * 1024;

const auditOf = (req: Request) => ({
  actorId: currentUser(req).id,
  ipAddress: req.ip ?? null,
});

async function owners(
  layouts: readonly RegionLayoutRecord[],
): Promise<Map<number, User>> {
  const users = await User.findAll({
    where: { id: [...new Set(layouts.map((l) => l.ownerId))] },
  });
  return new Map(users.map((u) => [u.id, u]));
}

async function presentLibrary(layouts: RegionLayoutRecord[], viewer: Actor) {
  const byId = await owners(layouts);
  return layouts.map((l) => {
    const edit = canEditLayout(viewer, l);
    return presentLayout(l, byId.get(l.ownerId) ?? null, {
      edit,
      delete: edit,
    });
  });
}

const canChangeStudy = (viewer: Actor, study: Study): boolean =>
  isOpenForChanges(study.status) && canEditStudy(viewer, study);

async function studyLayoutDto(
  study: Study,
  viewer: Actor,
): Promise<StudyLayoutDto> {
  const layout = await findStudyLayout(study.id);
  const edit = canChangeStudy(viewer, study);
  if (!layout) return { layout: null, placements: [], permissions: { edit } };
  const owner = (await owners([layout])).get(layout.ownerId) ?? null;
  return {
    layout: presentLayout(layout, owner, { edit, delete: false }),
    placements: (await listPlacements(layout.id)).map(presentPlacement),
    permissions: { edit },
  };
}

/** Loads a study the viewer may see and checks their role may change it. */
async function studyToChange(viewer: Actor, id: number): Promise<Study> {
  const study = await findStudyFor(viewer, id);
  authorize(
    canEditStudy(viewer, study),
    'Your role does not let you change this study.',
  );
  return study;
}

/** Loads a library layout and checks the viewer may change or delete it. */
async function layoutToChange(
  viewer: Actor,
  id: number,
  refusal: string,
): Promise<RegionLayoutRecord> {
  const layout = await findLibraryLayout(id);
  authorize(canEditLayout(viewer, layout), refusal);
  return layout;
}

const authorizeLibrary = (viewer: Actor): void =>
  authorize(
    canReadLayoutLibrary(viewer),
    'The committee reads layouts through signed studies.',
  );

/** An image's layout as placed on it; `edit` only counts when it has one. */
function imageRegionsDto(
  image: Image,
  layout: RegionLayoutRecord | null,
  row: ImageRegion | null,
  edit: boolean,
): ImageRegionsDto {
  return {
    imageId: image.id,
    studyId: image.studyId,
    layout: layout
      ? presentLayout(layout, null, { edit, delete: false })
      : null,
    placement: row ? presentPlacement(row) : null,
    placed: layout ? placedLayoutFor(layout, row, spacingOf(image)) : null,
    permissions: { edit: edit && layout !== null },
  };
}

/** Loads the image of `:id`; 404 when the viewer may not see it. */
async function readableImage(req: Request) {
  const { id } = imageIdParamsSchema.parse(req.params);
  const image = await findImageById(id);
  if (!canReadImage(currentUser(req), await imageFacts(image))) {
    throw notFound('image');
  }
  return image;
}

/**
 * Region layouts: the library (`/layouts`), each study's layout and its
 * application to the study's images (`/studies/:id/layout`), every image's
 * own placement (`/images/:id/regions`) and automatic object finding.
 */
export function layoutsRouter(config: AppConfig): Router {
  const pixels = createPixelCache(
    createDiskImageStore(fromRoot(config.uploadsDir)),
    PIXEL_CACHE_BYTES,
  );
  const router = Router();
  const preparers = requireRole('physicist', 'resident');

  router.get('/layouts', authenticate, async (req, res) => {
    const viewer = currentUser(req);
    authorizeLibrary(viewer);
    res.json({
      data: await presentLibrary(await listLibraryLayouts(), viewer),
    });
  });

  router.post('/layouts', authenticate, async (req, res) => {
    const viewer = currentUser(req);
    authorize(canSaveLayout(viewer), 'Physicists and residents save layouts.');
    const input = saveLayoutSchema.parse(req.body);
    const layout = await createLibraryLayout(input, auditOf(req));
    res.status(201).json({ data: (await presentLibrary([layout], viewer))[0] });
  });

  router.get('/layouts/:id', authenticate, async (req, res) => {
    const viewer = currentUser(req);
    authorizeLibrary(viewer);
    const { id } = layoutIdParamsSchema.parse(req.params);
    const layout = await findLibraryLayout(id);
    res.json({ data: (await presentLibrary([layout], viewer))[0] });
  });

  router.put('/layouts/:id', authenticate, async (req, res) => {
    const viewer = currentUser(req);
    const { id } = layoutIdParamsSchema.parse(req.params);
    const layout = await layoutToChange(
      viewer,
      id,
      'Only its owner or a physicist changes this layout.',
    );
    const input = saveLayoutSchema.parse(req.body);
    const updated = await updateLibraryLayout(layout, input, auditOf(req));
    res.json({ data: (await presentLibrary([updated], viewer))[0] });
  });

  router.delete('/layouts/:id', authenticate, async (req, res) => {
    const viewer = currentUser(req);
    const { id } = layoutIdParamsSchema.parse(req.params);
    const layout = await layoutToChange(
      viewer,
      id,
      'Only its owner or a physicist deletes this layout.',
    );
    await deleteLibraryLayout(layout, auditOf(req));
    res.status(204).end();
  });

  router.get('/studies/:id/layout', authenticate, async (req, res) => {
    const viewer = currentUser(req);
    const { id } = studyIdParamsSchema.parse(req.params);
    const study = await findStudyFor(viewer, id);
    res.json({ data: await studyLayoutDto(study, viewer) });
  });

  router.put('/studies/:id/layout', authenticate, async (req, res) => {
    const viewer = currentUser(req);
    const { id } = studyIdParamsSchema.parse(req.params);
    const study = await studyToChange(viewer, id);
    const input = setStudyLayoutSchema.parse(req.body);
    await setStudyLayout(study.id, input, auditOf(req));
    res.json({ data: await studyLayoutDto(study, viewer) });
  });

  router.post('/studies/:id/layout/apply', authenticate, async (req, res) => {
    const viewer = currentUser(req);
    const { id } = studyIdParamsSchema.parse(req.params);
    const study = await studyToChange(viewer, id);
    const input = applyLayoutSchema.parse(req.body);
    const { rows, warnings } = await applyStudyLayout(
      study.id,
      input,
      pixels,
      auditOf(req),
    );
    const body: ApplyLayoutResultDto = {
      placements: rows.map(presentPlacement),
      warnings,
    };
    res.json({ data: body });
  });

  router.get('/images/:id/regions', authenticate, async (req, res) => {
    const viewer = currentUser(req);
    const image = await readableImage(req);
    const { layout, row } = await imageRegionsOf(image);
    const study =
      image.studyId === null ? null : await findStudyFor(viewer, image.studyId);
    const edit = study !== null && canChangeStudy(viewer, study);
    res.json({ data: imageRegionsDto(image, layout, row, edit) });
  });

  router.put('/images/:id/regions', authenticate, async (req, res) => {
    const viewer = currentUser(req);
    const image = await readableImage(req);
    if (image.studyId !== null) {
      await studyToChange(viewer, image.studyId);
    } else {
      authorize(viewer.role === 'physicist' || viewer.role === 'resident');
    }
    const input = setImageRegionsSchema.parse(req.body);
    const { layout, row } = await setImageRegions(image, input, auditOf(req));
    res.json({ data: imageRegionsDto(image, layout, row, true) });
  });

  router.post(
    '/images/:id/find-objects',
    authenticate,
    preparers,
    async (req, res) => {
      const image = await readableImage(req);
      const input = findObjectsSchema.parse(req.body);
      res.json({ data: await findObjectsInImage(image, input, pixels) });
    },
  );

  return router;
}
