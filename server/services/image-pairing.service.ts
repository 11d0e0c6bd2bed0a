import { Op, type Transaction } from 'sequelize';
import type { ErrorDetail } from '../../shared/errors.ts';
import type {
  Arm,
  SaveAssignmentsInput,
} from '../../shared/schemas/study.schema.ts';
import {
  openSlots,
  proposePairing,
  type OpenSlot,
  type PairingImage,
  type PairingResult,
} from '../../shared/studies/pairing.ts';
import { validationFailed } from '../errors.ts';
import { enqueueStudyRecompute } from '../jobs/recompute-study.job.ts';
import { ImageAssignment } from '../models/image-assignment.model.ts';
import { effectiveAcquisition, Image } from '../models/image.model.ts';
import { StudyCondition } from '../models/study-condition.model.ts';
import type { Study } from '../models/study.model.ts';
import { recordAudit, type AuditContext } from './audit.service.ts';
import { gridsOfStudy } from './study-plan.service.ts';
import { STUDY_AUDIT_TARGET, withOpenStudy } from './study.service.ts';

/**
 * The header facts pairing reads from an image: the file's values with the
 * user's corrections laid over them (a corrected kV counts).
 */
export function pairingFacts(image: Image): PairingImage {
  const a = effectiveAcquisition(image);
  const ratio = a.gridAspectRatio;
  return {
    imageId: image.id,
    kvp: a.kvp,
    exposureMas: a.exposureMas,
    grid: a.grid,
    gridId: a.gridId,
    gridRatio: ratio && ratio[1] > 0 ? ratio[0] / ratio[1] : null,
    bodyPartThicknessMm: a.bodyPartThicknessMm,
    stationName: a.stationName,
    acquisitionDateTime: a.acquisitionDateTime,
  };
}

/** A study's images (upload order) and where each currently sits. */
export async function listStudyImages(
  studyId: number,
  transaction?: Transaction,
): Promise<{ images: Image[]; assignments: ImageAssignment[] }> {
  const images = await Image.findAll({
    where: { studyId },
    order: [['id', 'ASC']],
    transaction,
  });
  const assignments = await ImageAssignment.findAll({
    where: { studyId, imageId: { [Op.in]: images.map((i) => i.id) } },
    transaction,
  });
  return { images, assignments };
}

/** The condition arms still short of images. */
export async function studyOpenSlots(
  study: Study,
  assignments: readonly ImageAssignment[],
): Promise<OpenSlot[]> {
  const conditions = await StudyCondition.findAll({
    where: { studyId: study.id },
  });
  return openSlots(assignments, {
    conditions,
    replicates: study.plan.replicates,
  });
}

/**
 * Proposes where each image of the study goes, from its headers; writes
 * nothing (the user confirms with saveAssignments).
 */
export async function proposeStudyPairing(
  study: Study,
): Promise<PairingResult> {
  const [conditions, grids, { images }] = await Promise.all([
    StudyCondition.findAll({ where: { studyId: study.id } }),
    gridsOfStudy(study.id),
    listStudyImages(study.id),
  ]);
  return proposePairing(images.map(pairingFacts), {
    conditions,
    grids: grids.map((g) => ({
      id: g.id,
      label: g.label,
      serialNumber: g.serial,
      ratio: g.ratio,
    })),
    replicates: study.plan.replicates,
    exposure: study.plan.exposure,
  });
}

/**
 * Replaces the study's assignments with the confirmed set; images left out
 * become unassigned. Checks that every image and condition is the study's.
 * @throws DomainError study_locked when the study is submitted or signed.
 * @throws AppError 400 naming each foreign image or condition.
 */
export async function saveAssignments(
  studyId: number,
  input: SaveAssignmentsInput,
  audit: AuditContext,
): Promise<void> {
  await withOpenStudy(studyId, async (study, transaction) => {
    const [{ images, assignments: before }, conditions] = await Promise.all([
      listStudyImages(study.id, transaction),
      StudyCondition.findAll({ where: { studyId: study.id }, transaction }),
    ]);
    const issues: ErrorDetail[] = [];
    input.assignments.forEach((a, i) => {
      if (!images.some((img) => img.id === a.imageId)) {
        issues.push({
          path: `assignments.${i}.imageId`,
          message: `Image ${a.imageId} is not in this study.`,
        });
      }
      if (!conditions.some((c) => c.id === a.conditionId)) {
        issues.push({
          path: `assignments.${i}.conditionId`,
          message: `Condition ${a.conditionId} is not one of this study's.`,
        });
      }
    });
    if (issues.length > 0) throw validationFailed(issues);

    await ImageAssignment.destroy({
      where: {
        [Op.or]: [
          { studyId: study.id },
          { imageId: { [Op.in]: input.assignments.map((a) => a.imageId) } },
        ],
      },
      transaction,
    });
    await ImageAssignment.bulkCreate(
      input.assignments.map((a) => ({
        ...a,
        studyId: study.id,
        assignedBy: audit.actorId!,
      })),
      { transaction },
    );
    const place = (a: { conditionId: number; arm: Arm; replicate: number }) =>
      `${a.conditionId}/${a.arm}/${a.replicate}`;
    const moved = input.assignments
      .filter((a) => {
        const old = before.find((b) => b.imageId === a.imageId);
        return !old || place(old) !== place(a);
      })
      .map((a) => ({ imageId: a.imageId, to: place(a) }));
    const unassigned = before
      .filter((b) => !input.assignments.some((a) => a.imageId === b.imageId))
      .map((b) => b.imageId);
    await recordAudit(
      audit,
      {
        action: 'study.assignments_saved',
        targetType: STUDY_AUDIT_TARGET,
        targetId: study.id,
        details: {
          assigned: input.assignments.length,
          byUser: input.assignments.filter((a) => a.proposedBy === 'user')
            .length,
          placed: moved.slice(0, 100),
          unassigned,
        },
      },
      transaction,
    );
    // Saving the same set again still changes the study's trail and time.
    study.changed('updatedAt', true);
    await study.save({ transaction });
    await enqueueStudyRecompute(study.id, {
      reason: 'assignments saved',
      transaction,
    });
  });
}

/** One condition with the images that fill each arm, by replicate. */
export interface ConditionImageSet {
  condition: StudyCondition;
  grid: { imageId: number; replicate: number }[];
  noGrid: { imageId: number; replicate: number }[];
}

/**
 * The study's conditions in checklist order with their assigned images:
 * what figures are computed from.
 */
export async function conditionImageSets(
  studyId: number,
  transaction?: Transaction,
): Promise<ConditionImageSet[]> {
  const [conditions, { assignments }] = await Promise.all([
    StudyCondition.findAll({
      where: { studyId },
      order: [['position', 'ASC']],
      transaction,
    }),
    listStudyImages(studyId, transaction),
  ]);
  const arm = (conditionId: number, which: Arm) =>
    assignments
      .filter((a) => a.conditionId === conditionId && a.arm === which)
      .sort((x, y) => x.replicate - y.replicate)
      .map((a) => ({ imageId: a.imageId, replicate: a.replicate }));
  return conditions.map((condition) => ({
    condition,
    grid: arm(condition.id, 'grid'),
    noGrid: arm(condition.id, 'no_grid'),
  }));
}
