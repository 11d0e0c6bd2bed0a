import { QueryTypes } from 'sequelize';
import type {
  CorrectableField,
  ImageCorrections,
  ImageCorrectionsInput,
} from '../../shared/schemas/image.schema.ts';
import { STUDY_STATUSES } from '../../shared/schemas/study.schema.ts';
import { sequelize } from '../db/sequelize.ts';
import { notFound } from '../errors.ts';
import { enqueueStudyRecompute } from '../jobs/recompute-study.job.ts';
import { fileAcquisition, Image } from '../models/image.model.ts';
import type { ImageFacts } from '../policies/image.policy.ts';
import type { StudyFacts } from '../policies/study.policy.ts';
import { recordAudit, type AuditContext } from './audit.service.ts';

/**
 * What the image rules need about a study, read straight from the `studies`
 * table so images do not depend on the study model.
 * @returns null when there is no such study.
 */
export async function findStudyFacts(
  studyId: number,
): Promise<StudyFacts | null> {
  const rows = await sequelize.query<{ status: string; created_by: number }>(
    'SELECT status, created_by FROM studies WHERE id = :studyId',
    { replacements: { studyId }, type: QueryTypes.SELECT },
  );
  const row = rows[0];
  const status = STUDY_STATUSES.find((s) => s === row?.status);
  return row && status ? { status, createdBy: row.created_by } : null;
}

/** @throws AppError 404 when there is no such image. */
export async function findImageById(id: number): Promise<Image> {
  const image = await Image.findByPk(id);
  if (!image) throw notFound('image');
  return image;
}

/** What the image rules need to know about an image and its study. */
export async function imageFacts(image: Image): Promise<ImageFacts> {
  return {
    uploadedBy: image.uploadedBy,
    study: image.studyId === null ? null : await findStudyFacts(image.studyId),
  };
}

/** The images of a study, oldest first. */
export function listImagesOfStudy(studyId: number): Promise<Image[]> {
  return Image.findAll({ where: { studyId }, order: [['id', 'ASC']] });
}

/**
 * Records corrections of acquisition values beside the file's values: a
 * value sets (or replaces) the field's correction, null removes it. The
 * file's own columns never change. Audited with the file value, the
 * previous correction and the new one, in the same transaction.
 *
 * @returns the image with its corrections updated.
 * @throws AppError 404 when the image no longer exists.
 */
export async function correctImage(
  imageId: number,
  input: ImageCorrectionsInput,
  audit: AuditContext & { actorId: number },
): Promise<Image> {
  return sequelize.transaction(async (transaction) => {
    const image = await Image.findByPk(imageId, {
      transaction,
      lock: transaction.LOCK.UPDATE,
    });
    if (!image) throw notFound('image');
    const file = fileAcquisition(image) as unknown as Record<string, unknown>;
    const next: ImageCorrections = { ...image.corrections };
    const changes: Record<string, unknown> = {};
    const at = new Date().toISOString();
    for (const [field, value] of Object.entries(input.values) as Array<
      [CorrectableField, unknown]
    >) {
      if (value === undefined) continue;
      changes[field] = {
        fileValue: file[field] ?? null,
        before: next[field]?.value ?? null,
        after: value,
      };
      if (value === null) {
        delete next[field];
      } else {
        (next as Record<string, unknown>)[field] = {
          value,
          reason: input.reason,
          correctedBy: audit.actorId,
          correctedAt: at,
        };
      }
    }
    image.corrections = next;
    await image.save({ transaction });
    await recordAudit(
      audit,
      {
        action: 'image.corrected',
        targetType: 'image',
        targetId: image.id,
        details: { changes, reason: input.reason },
      },
      transaction,
    );
    if (image.studyId !== null) {
      await enqueueStudyRecompute(image.studyId, {
        reason: 'image corrected',
        transaction,
      });
    }
    return image;
  });
}
