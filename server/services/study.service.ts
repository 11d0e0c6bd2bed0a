import { isDeepStrictEqual } from 'node:util';
import { Op, type Transaction, type WhereOptions } from 'sequelize';
import type { Actor } from '../../shared/permissions.ts';
import type {
  CreateStudyInput,
  ListStudiesQuery,
  UpdateStudyInput,
} from '../../shared/schemas/study.schema.ts';
import { assertOpenForChanges } from '../../shared/studies/study-state.ts';
import { sequelize } from '../db/sequelize.ts';
import { notFound } from '../errors.ts';
import { enqueueStudyRecompute } from '../jobs/recompute-study.job.ts';
import type { Detector } from '../models/detector.model.ts';
import type { Grid } from '../models/grid.model.ts';
import { Room } from '../models/room.model.ts';
import { StudyCondition } from '../models/study-condition.model.ts';
import { StudyGrid } from '../models/study-grid.model.ts';
import { Study } from '../models/study.model.ts';
import { User } from '../models/user.model.ts';
import { canViewStudy, studyListScope } from '../policies/study.policy.ts';
import type { StudyRefs } from '../presenters/study.presenter.ts';
import { recordAudit, type AuditContext } from './audit.service.ts';
import {
  loadGeometryCheckImages,
  type GeometryCheckImage,
} from './study-geometry-check.service.ts';
import {
  checkStudyEquipment,
  gridsOfStudy,
  loadStudyEquipment,
  syncStudyConditions,
} from './study-plan.service.ts';

/** Every study-related audit event is filed under this target type. */
export const STUDY_AUDIT_TARGET = 'study';

/**
 * The studies the viewer may see, newest change first. The committee's
 * limit to signed studies is part of the query, not a filter afterwards.
 */
export async function listStudies(
  viewer: Actor,
  query: ListStudiesQuery,
): Promise<Study[]> {
  const scope = studyListScope(viewer);
  if (scope && query.status && query.status !== scope) return [];
  const where: WhereOptions<Study> = {};
  const status = scope ?? query.status;
  if (status) where.status = status;
  if (query.roomId) where.roomId = query.roomId;
  if (query.mine) where.createdBy = viewer.id;
  return Study.findAll({ where, order: [['updatedAt', 'DESC']], limit: 500 });
}

/** Rooms, people and grid counts the listed studies refer to. */
export async function loadStudyRefs(
  studies: readonly Study[],
  transaction?: Transaction,
): Promise<StudyRefs> {
  const ids = studies.map((s) => s.id);
  const userIds = studies.flatMap((s) =>
    s.signedBy === null ? [s.createdBy] : [s.createdBy, s.signedBy],
  );
  const [rooms, users, links] = await Promise.all([
    Room.findAll({
      where: { id: { [Op.in]: studies.map((s) => s.roomId) } },
      transaction,
    }),
    User.findAll({ where: { id: { [Op.in]: userIds } }, transaction }),
    StudyGrid.findAll({ where: { studyId: { [Op.in]: ids } }, transaction }),
  ]);
  const gridCounts = new Map<number, number>();
  for (const l of links) {
    gridCounts.set(l.studyId, (gridCounts.get(l.studyId) ?? 0) + 1);
  }
  return {
    rooms: new Map(rooms.map((r) => [r.id, r])),
    users: new Map(users.map((u) => [u.id, u])),
    gridCounts,
  };
}

/**
 * The study, if the viewer may see it.
 * @throws AppError 404 when there is no such study or the viewer may not
 *   see it (the same answer, so its existence stays hidden).
 */
export async function findStudyFor(viewer: Actor, id: number): Promise<Study> {
  const study = await Study.findByPk(id);
  if (!study || !canViewStudy(viewer, study)) throw notFound('study');
  return study;
}

/** Everything the study page shows beside the study row itself. */
export async function loadStudyParts(
  study: Study,
  transaction?: Transaction,
): Promise<{
  refs: StudyRefs;
  detector: Detector | null;
  grids: Grid[];
  conditions: StudyCondition[];
  geometryImages: GeometryCheckImage[];
}> {
  const [refs, equipment, conditions, geometryImages] = await Promise.all([
    loadStudyRefs([study], transaction),
    loadStudyEquipment(study, transaction),
    StudyCondition.findAll({
      where: { studyId: study.id },
      order: [['position', 'ASC']],
      transaction,
    }),
    loadGeometryCheckImages(study.id, transaction),
  ]);
  return {
    refs,
    detector: equipment.detector,
    grids: equipment.grids,
    conditions,
    geometryImages,
  };
}

/**
 * Runs `work` in a transaction holding the study's row lock, so a state
 * change and an edit cannot interleave.
 * @throws AppError 404 when the study has gone.
 */
export async function withLockedStudy<T>(
  studyId: number,
  work: (study: Study, transaction: Transaction) => Promise<T>,
): Promise<T> {
  return sequelize.transaction(async (transaction) => {
    const study = await Study.findByPk(studyId, {
      transaction,
      lock: transaction.LOCK.UPDATE,
    });
    if (!study) throw notFound('study');
    return work(study, transaction);
  });
}

/**
 * Like withLockedStudy, for changes: refuses unless the study is a draft or
 * returned.
 * @throws DomainError study_locked (409) when it is submitted or signed.
 */
export function withOpenStudy<T>(
  studyId: number,
  work: (study: Study, transaction: Transaction) => Promise<T>,
): Promise<T> {
  return withLockedStudy(studyId, async (study, transaction) => {
    assertOpenForChanges(study.status);
    return work(study, transaction);
  });
}

/**
 * Creates a draft study from a plan, with its grids under test and the
 * conditions the plan defines.
 * @throws AppError 400 when the room, detector or grids are not right.
 */
export async function createStudy(
  input: CreateStudyInput,
  audit: AuditContext,
): Promise<Study> {
  return sequelize.transaction(async (transaction) => {
    await checkStudyEquipment(input, transaction);
    const study = await Study.create(
      {
        roomId: input.roomId,
        detectorId: input.detectorId,
        title: input.title,
        purpose: input.purpose,
        plan: input.plan,
        createdBy: audit.actorId!,
      },
      { transaction },
    );
    const conditions = await syncStudyConditions(
      study,
      input.gridIds,
      transaction,
    );
    await recordAudit(
      audit,
      {
        action: 'study.created',
        targetType: STUDY_AUDIT_TARGET,
        targetId: study.id,
        details: {
          title: input.title,
          roomId: input.roomId,
          gridIds: input.gridIds,
          conditions: conditions.added,
        },
      },
      transaction,
    );
    return study;
  });
}

/**
 * Changes a draft or returned study: title, purpose, room, detector, grids
 * or plan. Conditions follow the plan (see syncStudyConditions).
 * @throws DomainError study_locked when it is submitted or signed.
 * @throws AppError 400 when the equipment or plan is not right.
 */
export async function updateStudy(
  studyId: number,
  input: UpdateStudyInput,
  audit: AuditContext,
): Promise<Study> {
  return withOpenStudy(studyId, async (study, transaction) => {
    const currentGridIds = (await gridsOfStudy(study.id, transaction)).map(
      (g) => g.id,
    );
    const next = {
      roomId: input.roomId ?? study.roomId,
      detectorId:
        input.detectorId === undefined ? study.detectorId : input.detectorId,
      gridIds: input.gridIds ?? currentGridIds,
      plan: input.plan ?? study.plan,
    };
    await checkStudyEquipment(next, transaction);
    const before = {
      title: study.title,
      purpose: study.purpose,
      roomId: study.roomId,
      detectorId: study.detectorId,
      gridIds: currentGridIds,
      plan: study.plan,
    };
    study.set({
      title: input.title ?? study.title,
      purpose: input.purpose ?? study.purpose,
      roomId: next.roomId,
      detectorId: next.detectorId,
      plan: next.plan,
    });
    await study.save({ transaction });
    const conditions =
      input.plan || input.gridIds
        ? await syncStudyConditions(study, next.gridIds, transaction)
        : null;
    // Deep comparison: JSONB does not keep key order, so text would differ.
    const changed = Object.keys(input).filter(
      (k) =>
        !isDeepStrictEqual(
          before[k as keyof typeof before],
          input[k as keyof UpdateStudyInput],
        ),
    );
    await recordAudit(
      audit,
      {
        action: 'study.updated',
        targetType: STUDY_AUDIT_TARGET,
        targetId: study.id,
        details: {
          changed,
          before: Object.fromEntries(
            changed.map((k) => [k, before[k as keyof typeof before]]),
          ),
          ...(conditions ? { conditions } : {}),
        },
      },
      transaction,
    );
    await enqueueStudyRecompute(study.id, {
      reason: 'study changed',
      transaction,
    });
    return study;
  });
}
