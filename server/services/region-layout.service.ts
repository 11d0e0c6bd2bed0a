import type { Transaction } from 'sequelize';
import type { RegionLayout } from '../../shared/analysis/region-layout.ts';
import { parseRegionLayout } from '../../shared/analysis/region-layout.ts';
import {
  findCircularObjects,
  proposeObjectRegions,
} from '../../shared/roi/find-circular-objects.ts';
import type { ImagePlacement } from '../../shared/roi/image-shift.ts';
import {
  estimateImageShift,
  placeLayout,
} from '../../shared/roi/image-shift.ts';
import type {
  ApplyLayoutInput,
  FindObjectsInput,
  FindObjectsResultDto,
  SaveLayoutInput,
  SetImageRegionsInput,
  SetStudyLayoutInput,
} from '../../shared/schemas/layout.schema.ts';
import type { PixelSpacingMm } from '../../shared/roi/region-geometry.ts';
import type { Warning } from '../../shared/warnings.ts';
import { sequelize } from '../db/sequelize.ts';
import { conflict, notFound, validationFailed } from '../errors.ts';
import { enqueueStudyRecompute } from '../jobs/recompute-study.job.ts';
import { ImageRegion } from '../models/image-region.model.ts';
import { Image } from '../models/image.model.ts';
import {
  RegionLayoutRecord,
  toRegionLayout,
} from '../models/region-layout.model.ts';
import { recordAudit, type AuditContext } from './audit.service.ts';
import type { PixelCache } from './image-pixels.service.ts';
import { STUDY_AUDIT_TARGET, withOpenStudy } from './study.service.ts';

/** Library layouts (those of no study), by name. */
export function listLibraryLayouts(): Promise<RegionLayoutRecord[]> {
  return RegionLayoutRecord.findAll({
    where: { studyId: null },
    order: [
      ['name', 'ASC'],
      ['id', 'ASC'],
    ],
    limit: 500,
  });
}

/** @throws AppError 404 when there is no such library layout. */
export async function findLibraryLayout(
  id: number,
  transaction?: Transaction,
): Promise<RegionLayoutRecord> {
  const layout = await RegionLayoutRecord.findByPk(id, { transaction });
  if (!layout || layout.studyId !== null) throw notFound('layout');
  return layout;
}

/** The study's current layout, or null before one is saved. */
export function findStudyLayout(
  studyId: number,
  transaction?: Transaction,
): Promise<RegionLayoutRecord | null> {
  return RegionLayoutRecord.findOne({ where: { studyId }, transaction });
}

/** Where the layout sits on the images it was applied to. */
export function listPlacements(
  layoutId: number,
  transaction?: Transaction,
): Promise<ImageRegion[]> {
  return ImageRegion.findAll({
    where: { layoutId },
    order: [['imageId', 'ASC']],
    transaction,
  });
}

/** An image's placement; no row means the layout as drawn (no offset). */
export const placementOf = (
  row: ImageRegion | null | undefined,
): ImagePlacement =>
  row
    ? { dxPx: row.dxPx, dyPx: row.dyPx, overrides: row.overrides }
    : { dxPx: 0, dyPx: 0, overrides: {} };

/**
 * The layout as it falls on one image.
 * @throws DomainError('region_invalid') when the placement does not fit the
 *   layout (see placeLayout).
 */
export function placedLayoutFor(
  layout: RegionLayoutRecord,
  row: ImageRegion | null | undefined,
  pixelSpacing: PixelSpacingMm | null,
): RegionLayout {
  return placeLayout(toRegionLayout(layout), placementOf(row), pixelSpacing);
}

async function checkReferenceImage(
  imageId: number | null,
  studyId: number | null,
  transaction?: Transaction,
): Promise<void> {
  if (imageId === null) return;
  const image = await Image.findByPk(imageId, {
    attributes: ['id', 'studyId'],
    transaction,
  });
  const inStudy = studyId === null || image?.studyId === studyId;
  if (!image || !inStudy) {
    throw validationFailed([
      {
        path: 'referenceImageId',
        message:
          studyId === null
            ? 'No such image.'
            : 'The layout must be drawn on an image of this study.',
      },
    ]);
  }
}

/**
 * Saves a layout to the library, for later studies of the same phantom.
 * @throws AppError 400 when the reference image does not exist.
 */
export async function createLibraryLayout(
  input: SaveLayoutInput,
  audit: AuditContext & { actorId: number },
): Promise<RegionLayoutRecord> {
  return sequelize.transaction(async (transaction) => {
    await checkReferenceImage(input.referenceImageId, null, transaction);
    const layout = await RegionLayoutRecord.create(
      {
        ...layoutColumns(input.layout),
        ownerId: audit.actorId,
        studyId: null,
        referenceImageId: input.referenceImageId,
      },
      { transaction },
    );
    await recordAudit(
      audit,
      {
        action: 'layout.created',
        targetType: 'layout',
        targetId: layout.id,
        details: { name: layout.name, regions: layout.regions.length },
      },
      transaction,
    );
    return layout;
  });
}

/** Replaces a library layout's name, description and regions. */
export async function updateLibraryLayout(
  layout: RegionLayoutRecord,
  input: SaveLayoutInput,
  audit: AuditContext,
): Promise<RegionLayoutRecord> {
  return sequelize.transaction(async (transaction) => {
    await checkReferenceImage(input.referenceImageId, null, transaction);
    const before = { name: layout.name, regions: layout.regions.length };
    await layout.update(
      {
        ...layoutColumns(input.layout),
        referenceImageId: input.referenceImageId,
      },
      { transaction },
    );
    await recordAudit(
      audit,
      {
        action: 'layout.updated',
        targetType: 'layout',
        targetId: layout.id,
        details: {
          before,
          after: { name: layout.name, regions: layout.regions.length },
        },
      },
      transaction,
    );
    return layout;
  });
}

/** Deletes a library layout; studies keep the copies they took. */
export async function deleteLibraryLayout(
  layout: RegionLayoutRecord,
  audit: AuditContext,
): Promise<void> {
  await sequelize.transaction(async (transaction) => {
    await layout.destroy({ transaction });
    await recordAudit(
      audit,
      {
        action: 'layout.deleted',
        targetType: 'layout',
        targetId: layout.id,
        details: { name: layout.name },
      },
      transaction,
    );
  });
}

function layoutColumns(layout: RegionLayout) {
  return {
    name: layout.name,
    description: layout.description ?? '',
    units: layout.units,
    regions: layout.regions,
  };
}

/**
 * Sets the study's layout: drawn on one of its images, or copied from the
 * library (the copy is the study's own, so later library edits never reach
 * it). Placements survive when the reference image stays the same (own
 * regions of removed names are dropped); with a new reference image they
 * are removed, to be found again by applying the layout.
 * @throws DomainError study_locked (409) for a submitted or signed study;
 *   AppError 404 for an unknown library layout, 400 for a reference image
 *   outside the study.
 */
export async function setStudyLayout(
  studyId: number,
  input: SetStudyLayoutInput,
  audit: AuditContext & { actorId: number },
): Promise<RegionLayoutRecord> {
  return withOpenStudy(studyId, async (study, transaction) => {
    let layout: RegionLayout;
    let referenceImageId: number | null;
    let fromLayoutId: number | null = null;
    if ('fromLayoutId' in input) {
      const source = await findLibraryLayout(input.fromLayoutId, transaction);
      layout = toRegionLayout(source);
      referenceImageId = source.referenceImageId;
      fromLayoutId = source.id;
    } else {
      await checkReferenceImage(input.referenceImageId, study.id, transaction);
      layout = input.layout;
      referenceImageId = input.referenceImageId;
    }
    const existing = await findStudyLayout(study.id, transaction);
    let record: RegionLayoutRecord;
    if (existing) {
      const sameReference = existing.referenceImageId === referenceImageId;
      await existing.update(
        { ...layoutColumns(layout), referenceImageId, ownerId: audit.actorId },
        { transaction },
      );
      record = existing;
      if (!sameReference) {
        await ImageRegion.destroy({
          where: { layoutId: existing.id },
          transaction,
        });
      } else {
        const names = new Set(layout.regions.map((r) => r.name));
        for (const row of await listPlacements(existing.id, transaction)) {
          const kept = Object.fromEntries(
            Object.entries(row.overrides).filter(([name]) => names.has(name)),
          );
          if (Object.keys(kept).length !== Object.keys(row.overrides).length) {
            await row.update({ overrides: kept }, { transaction });
          }
        }
      }
    } else {
      record = await RegionLayoutRecord.create(
        {
          ...layoutColumns(layout),
          ownerId: audit.actorId,
          studyId: study.id,
          referenceImageId,
        },
        { transaction },
      );
    }
    await recordAudit(
      audit,
      {
        action: 'study.layout_saved',
        targetType: STUDY_AUDIT_TARGET,
        targetId: study.id,
        details: {
          layoutId: record.id,
          name: layout.name,
          regions: layout.regions.map((r) => `${r.name}: ${r.spec}`),
          fromLayoutId,
          referenceImageId,
        },
      },
      transaction,
    );
    await enqueueStudyRecompute(study.id, {
      reason: 'layout saved',
      transaction,
    });
    return record;
  });
}

/**
 * Applies the study's layout to every image of the study: with
 * `autoShift`, each image's offset from the layout's reference image is
 * measured by cross-correlation (an offset whose correlation is below
 * `minConfidence` is not trusted: 0 is used, with a warning); without it,
 * every image gets the layout as drawn. Images' own regions are cleared.
 * The shifts are measured before the study is locked for writing, so a
 * slow measurement does not hold up other changes.
 * @returns the placements and warnings.
 * @throws AppError 409 when the study has no layout or it changed while the
 *   shifts were measured; DomainError study_locked for a closed study.
 */
export async function applyStudyLayout(
  studyId: number,
  input: ApplyLayoutInput,
  pixels: PixelCache,
  audit: AuditContext & { actorId: number },
): Promise<{ rows: ImageRegion[]; warnings: Warning[] }> {
  const layout = await findStudyLayout(studyId);
  if (!layout) {
    throw conflict(
      'The study has no region layout yet: draw one and save it first.',
    );
  }
  const images = await Image.findAll({
    where: { studyId },
    order: [['id', 'ASC']],
  });
  if (images.length === 0)
    throw conflict('The study has no images to apply the layout to.');
  const warnings: Warning[] = [];
  const reference =
    (layout.referenceImageId !== null &&
      (images.find((i) => i.id === layout.referenceImageId) ??
        (await Image.findByPk(layout.referenceImageId)))) ||
    images[0]!;
  if (
    layout.referenceImageId === null ||
    reference.id !== layout.referenceImageId
  ) {
    warnings.push({
      code: 'no_reference_image',
      message: `The layout does not say which image it was drawn on, so shifts are measured from ${reference.originalName}.`,
    });
  }
  const placements = new Map<
    number,
    Omit<ImagePlacement, 'overrides'> & {
      confidence: number | null;
      source: ImageRegion['source'];
    }
  >();
  const referencePixels = input.autoShift ? await pixels.get(reference) : null;
  for (const image of images) {
    if (!referencePixels || image.id === reference.id) {
      placements.set(image.id, {
        dxPx: 0,
        dyPx: 0,
        confidence: null,
        source: 'applied',
      });
      continue;
    }
    const shift = estimateImageShift(referencePixels, await pixels.get(image));
    if (shift.confidence < input.minConfidence) {
      warnings.push({
        code: 'shift_not_trusted',
        message: `${image.originalName}: the phantom could not be followed (correlation ${shift.confidence.toFixed(2)}); the layout is placed as drawn. Check it in the region editor.`,
      });
      placements.set(image.id, {
        dxPx: 0,
        dyPx: 0,
        confidence: shift.confidence,
        source: 'applied',
      });
    } else {
      placements.set(image.id, {
        dxPx: Math.round(shift.dxPx * 100) / 100,
        dyPx: Math.round(shift.dyPx * 100) / 100,
        confidence: shift.confidence,
        source: 'auto_shift',
      });
    }
  }
  const rows = await withOpenStudy(studyId, async (study, transaction) => {
    const current = await findStudyLayout(study.id, transaction);
    if (
      !current ||
      current.id !== layout.id ||
      current.updatedAt.getTime() !== layout.updatedAt.getTime()
    ) {
      throw conflict(
        'The layout changed while it was being applied; apply it again.',
      );
    }
    const existing = await listPlacements(layout.id, transaction);
    const cleared = existing.filter((r) => Object.keys(r.overrides).length > 0);
    if (cleared.length > 0) {
      warnings.push({
        code: 'image_regions_cleared',
        message: `${cleared.length} image(s) had regions of their own; applying the layout replaced them.`,
      });
    }
    for (const image of images) {
      const p = placements.get(image.id)!;
      await savePlacement(
        image.id,
        {
          layoutId: layout.id,
          dxPx: p.dxPx,
          dyPx: p.dyPx,
          shiftConfidence: p.confidence,
          source: p.source,
          overrides: {},
          updatedBy: audit.actorId,
        },
        transaction,
      );
    }
    await recordAudit(
      audit,
      {
        action: 'study.layout_applied',
        targetType: STUDY_AUDIT_TARGET,
        targetId: study.id,
        details: {
          layoutId: layout.id,
          autoShift: input.autoShift,
          referenceImageId: reference.id,
          images: images.length,
          offsets: images.map((i) => {
            const p = placements.get(i.id)!;
            return {
              imageId: i.id,
              dxPx: p.dxPx,
              dyPx: p.dyPx,
              source: p.source,
            };
          }),
        },
      },
      transaction,
    );
    await enqueueStudyRecompute(study.id, {
      reason: 'layout applied',
      transaction,
    });
    return listPlacements(layout.id, transaction);
  });
  return { rows, warnings };
}

/** Creates or replaces the placement row of one image. */
async function savePlacement(
  imageId: number,
  values: Pick<
    ImageRegion,
    | 'layoutId'
    | 'dxPx'
    | 'dyPx'
    | 'shiftConfidence'
    | 'source'
    | 'overrides'
    | 'updatedBy'
  >,
  transaction: Transaction,
): Promise<ImageRegion> {
  const row = await ImageRegion.findOne({ where: { imageId }, transaction });
  if (row) return row.update(values, { transaction });
  return ImageRegion.create({ imageId, ...values }, { transaction });
}

/** The study layout and this image's placement of it. */
export async function imageRegionsOf(image: Image): Promise<{
  layout: RegionLayoutRecord | null;
  row: ImageRegion | null;
}> {
  if (image.studyId === null) return { layout: null, row: null };
  const layout = await findStudyLayout(image.studyId);
  if (!layout) return { layout: null, row: null };
  const row = await ImageRegion.findOne({
    where: { imageId: image.id, layoutId: layout.id },
  });
  return { layout, row };
}

/**
 * Sets this image's own offset and regions (a phantom the automatic shift
 * did not follow, an object that moved on this exposure only).
 * @throws AppError 409 when the image is in no study or the study has no
 *   layout; DomainError study_locked for a closed study; DomainError
 *   region_invalid (400) for an override that does not fit the layout.
 */
export async function setImageRegions(
  image: Image,
  input: SetImageRegionsInput,
  audit: AuditContext & { actorId: number },
): Promise<{ layout: RegionLayoutRecord; row: ImageRegion }> {
  if (image.studyId === null)
    throw conflict('The image is in no study, so it has no layout.');
  return withOpenStudy(image.studyId, async (study, transaction) => {
    const layout = await findStudyLayout(study.id, transaction);
    if (!layout) {
      throw conflict('The study has no region layout yet: save one first.');
    }
    const placement = {
      dxPx: input.dxPx,
      dyPx: input.dyPx,
      overrides: input.overrides,
    };
    const placed = placeLayout(
      toRegionLayout(layout),
      placement,
      spacingOf(image),
    );
    parseRegionLayout(placed);
    const row = await savePlacement(
      image.id,
      {
        layoutId: layout.id,
        ...placement,
        shiftConfidence: null,
        source: 'manual',
        updatedBy: audit.actorId,
      },
      transaction,
    );
    await recordAudit(
      audit,
      {
        action: 'study.image_regions_set',
        targetType: STUDY_AUDIT_TARGET,
        targetId: study.id,
        details: {
          imageId: image.id,
          dxPx: input.dxPx,
          dyPx: input.dyPx,
          overrides: input.overrides,
        },
      },
      transaction,
    );
    await enqueueStudyRecompute(study.id, {
      reason: 'image regions changed',
      transaction,
    });
    return { layout, row };
  });
}

/** The image's pixel spacing as the decoder chooses it (imager first). */
export function spacingOf(image: Image): PixelSpacingMm | null {
  if (image.spacingRowMm !== null && image.spacingColumnMm !== null) {
    return { rowMm: image.spacingRowMm, columnMm: image.spacingColumnMm };
  }
  return null;
}

/**
 * Finds circular contrast objects in an image and proposes an object circle
 * and a background ring for each.
 * @see findCircularObjects for the method.
 */
export async function findObjectsInImage(
  image: Image,
  input: FindObjectsInput,
  pixels: PixelCache,
): Promise<FindObjectsResultDto> {
  const decoded = await pixels.get(image);
  const found = findCircularObjects(decoded, {
    minRadiusPx: input.minRadiusPx,
    maxRadiusPx: input.maxRadiusPx,
    polarity: input.polarity,
    maxObjects: input.maxObjects,
  });
  const proposal = proposeObjectRegions(found.objects);
  return {
    objects: found.objects,
    regions: proposal.regions,
    decimation: found.decimation,
    warnings: [...found.warnings, ...proposal.warnings],
  };
}
