import { Op, type Transaction } from 'sequelize';
import type { ErrorDetail } from '../../shared/errors.ts';
import type { StudyPlan } from '../../shared/schemas/study.schema.ts';
import {
  conditionsFromPlan,
  expectedAcquisitionCount,
  MAX_EXPECTED_ACQUISITIONS,
} from '../../shared/studies/expected-acquisitions.ts';
import { validationFailed } from '../errors.ts';
import { Detector } from '../models/detector.model.ts';
import { Grid } from '../models/grid.model.ts';
import { ImageAssignment } from '../models/image-assignment.model.ts';
import { Room } from '../models/room.model.ts';
import { StudyCondition } from '../models/study-condition.model.ts';
import { StudyGrid } from '../models/study-grid.model.ts';
import type { Study } from '../models/study.model.ts';

/** The equipment a study names, as the plan form and checks need it. */
export interface StudyEquipment {
  room: Room;
  detector: Detector | null;
  grids: Grid[];
}

/**
 * Checks that the room, detector and grids exist, that the detector is one
 * of the room's, and that the plan is one session's work.
 * @throws AppError 400 validation_failed naming each bad field.
 */
export async function checkStudyEquipment(
  input: {
    roomId: number;
    detectorId: number | null;
    gridIds: number[];
    plan: StudyPlan;
  },
  transaction?: Transaction,
): Promise<StudyEquipment> {
  const issues: ErrorDetail[] = [];
  const room = await Room.findByPk(input.roomId, { transaction });
  if (!room) issues.push({ path: 'roomId', message: 'No such room.' });
  const detector =
    input.detectorId === null
      ? null
      : await Detector.findByPk(input.detectorId, { transaction });
  if (input.detectorId !== null && !detector) {
    issues.push({ path: 'detectorId', message: 'No such detector.' });
  } else if (detector && room && detector.roomId !== room.id) {
    issues.push({
      path: 'detectorId',
      message: `This detector belongs to another room, not ${room.name}.`,
    });
  }
  const found = await Grid.findAll({
    where: { id: { [Op.in]: input.gridIds } },
    transaction,
  });
  const missing = input.gridIds.filter((id) => !found.some((g) => g.id === id));
  if (missing.length > 0) {
    issues.push({
      path: 'gridIds',
      message: `No such grid: ${missing.join(', ')}.`,
    });
  }
  const count = expectedAcquisitionCount(input.plan, input.gridIds.length);
  if (count > MAX_EXPECTED_ACQUISITIONS) {
    issues.push({
      path: 'plan',
      message: `This plan asks for ${count} exposures; keep one study to at most ${MAX_EXPECTED_ACQUISITIONS}.`,
    });
  }
  if (issues.length > 0) throw validationFailed(issues);
  const grids = input.gridIds.map((id) => found.find((g) => g.id === id)!);
  return { room: room!, detector, grids };
}

/** What changed in a study's conditions when its plan or grids changed. */
export interface ConditionChanges {
  added: number;
  removed: number;
  kept: number;
  assignmentsDropped: number;
}

/**
 * Brings the study's grids and conditions in line with its plan. A
 * condition whose kV, filtration, thickness and grid are unchanged keeps its
 * id and images; one the plan no longer has is removed with its assignments.
 */
export async function syncStudyConditions(
  study: Study,
  gridIds: number[],
  transaction: Transaction,
): Promise<ConditionChanges> {
  await StudyGrid.destroy({ where: { studyId: study.id }, transaction });
  await StudyGrid.bulkCreate(
    gridIds.map((gridId, i) => ({
      studyId: study.id,
      gridId,
      position: i + 1,
    })),
    { transaction },
  );

  const planned = conditionsFromPlan(study.plan, gridIds);
  const existing = await StudyCondition.findAll({
    where: { studyId: study.id },
    transaction,
  });
  const wanted = new Set(planned.map((c) => c.key));
  const gone = existing.filter((c) => !wanted.has(c.conditionKey));
  const assignmentsDropped =
    gone.length === 0
      ? 0
      : await ImageAssignment.destroy({
          where: { conditionId: { [Op.in]: gone.map((c) => c.id) } },
          transaction,
        });
  if (gone.length > 0) {
    await StudyCondition.destroy({
      where: { id: { [Op.in]: gone.map((c) => c.id) } },
      transaction,
    });
  }
  let added = 0;
  for (const c of planned) {
    const row = existing.find((e) => e.conditionKey === c.key);
    const values = {
      position: c.position,
      kvp: c.kvp,
      addedFiltration: c.addedFiltration,
      hvlMmAl: c.hvlMmAl,
      phantomThicknessCm: c.phantomThicknessCm,
      gridId: c.gridId,
    };
    if (row) {
      await row.update(values, { transaction });
    } else {
      await StudyCondition.create(
        { studyId: study.id, conditionKey: c.key, ...values },
        { transaction },
      );
      added++;
    }
  }
  return {
    added,
    removed: gone.length,
    kept: planned.length - added,
    assignmentsDropped,
  };
}

/** The grids under test of a study, in the study's order. */
export async function gridsOfStudy(
  studyId: number,
  transaction?: Transaction,
): Promise<Grid[]> {
  const links = await StudyGrid.findAll({
    where: { studyId },
    order: [['position', 'ASC']],
    transaction,
  });
  const grids = await Grid.findAll({
    where: { id: { [Op.in]: links.map((l) => l.gridId) } },
    transaction,
  });
  return links.map((l) => grids.find((g) => g.id === l.gridId)!);
}

/** The room, detector and grids a study names. */
export async function loadStudyEquipment(
  study: Study,
  transaction?: Transaction,
): Promise<StudyEquipment> {
  const [room, detector, grids] = await Promise.all([
    Room.findByPk(study.roomId, { transaction }),
    study.detectorId === null
      ? null
      : Detector.findByPk(study.detectorId, { transaction }),
    gridsOfStudy(study.id, transaction),
  ]);
  // rooms.id is referenced with RESTRICT, so the room is always there.
  return { room: room!, detector, grids };
}

/** Rooms, detectors and grids a plan may name. */
export async function listStudyOptions(): Promise<{
  rooms: Room[];
  detectors: Detector[];
  grids: Grid[];
}> {
  const [rooms, detectors, grids] = await Promise.all([
    Room.findAll({ order: [['name', 'ASC']] }),
    Detector.findAll({ order: [['name', 'ASC']] }),
    Grid.findAll({ order: [['label', 'ASC']] }),
  ]);
  return { rooms, detectors, grids };
}
