import type { Transaction } from 'sequelize';
import type { RegionLayout } from '../../shared/analysis/region-layout.ts';
import type {
  SaveLayoutInput,
  SetStudyLayoutInput,
} from '../../shared/schemas/layout.schema.ts';
import { sequelize } from '../db/sequelize.ts';
import { notFound, validationFailed } from '../errors.ts';
import { enqueueStudyRecompute } from '../jobs/recompute-study.job.ts';
import { ImageRegion } from '../models/image-region.model.ts';
import { Image } from '../models/image.model.ts';
import {
  RegionLayoutRecord,
  toRegionLayout,
} from '../models/region-layout.model.ts';
import { recordAudit, type AuditContext } from './audit.service.ts';
import { STUDY_AUDIT_TARGET, withOpenStudy } from './study.service.ts';

/**
 * Named region layouts: the library, reusable across studies of the same
 * phantom, and each study's own current layout.
 */

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
