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
import type { PixelSpacingMm } from '../../shared/roi/region-geometry.ts';
import type {
  ApplyLayoutInput,
  FindObjectsInput,
  FindObjectsResultDto,
  SetImageRegionsInput,
} from '../../shared/schemas/layout.schema.ts';
import type { Warning } from '../../shared/warnings.ts';
import { conflict } from '../errors.ts';
import { enqueueStudyRecompute } from '../jobs/recompute-study.job.ts';
import { ImageRegion } from '../models/image-region.model.ts';
import { Image } from '../models/image.model.ts';
import {
  toRegionLayout,
  type RegionLayoutRecord,
} from '../models/region-layout.model.ts';
import { recordAudit, type AuditContext } from './audit.service.ts';
import type { PixelCache } from './image-pixels.service.ts';
import { findStudyLayout, listPlacements } from './region-layout.service.ts';
import { STUDY_AUDIT_TARGET, withOpenStudy } from './study.service.ts';

/**
 * Where a study's layout sits on each image: applying it to every image
 * (with the automatic shift), an image's own offset and regions, the layout
 * as it falls on one image, and automatic object finding.
 */

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
