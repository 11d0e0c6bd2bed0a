import { QueryTypes, type Sequelize, type WhereOptions } from 'sequelize';
import {
  DEFAULT_TOLERANCE_PERCENT,
  filtrationKey,
} from '../../shared/compare/tolerance.ts';
import type { FigureKey } from '../../shared/figures.ts';
import type {
  BaselineFigureDto,
  CreateBaselineInput,
  UpdateBaselineInput,
} from '../../shared/schemas/compare.schema.ts';
import type { FilterLayer } from '../../shared/schemas/study.schema.ts';
import { sequelize } from '../db/sequelize.ts';
import { conflict, notFound, validationFailed } from '../errors.ts';
import { Baseline } from '../models/baseline.model.ts';
import { ConditionAnalysis } from '../models/condition-analysis.model.ts';
import { ConditionFigure } from '../models/condition-figure.model.ts';
import { Grid } from '../models/grid.model.ts';
import { Room } from '../models/room.model.ts';
import { StudyCondition } from '../models/study-condition.model.ts';
import { Study } from '../models/study.model.ts';
import { User } from '../models/user.model.ts';
import { recordAudit, type AuditContext } from './audit.service.ts';

/** A baseline with the names and dates its presentation needs. */
export interface DescribedBaseline {
  baseline: Baseline;
  roomName: string;
  gridLabel: string;
  studyTitle: string;
  /** When the source study was signed; later studies are flagged. */
  sourceSignedAt: Date | null;
  setBy: { id: number; displayName: string; role: User['role'] };
}

/** A baseline as the board, trends and summary read it (raw SQL). */
export interface ActiveBaseline {
  id: number;
  roomId: number;
  gridId: number;
  kvp: number;
  addedFiltration: FilterLayer[];
  phantomThicknessCm: number;
  sourceConditionId: number | null;
  sourceSignedAt: Date | null;
  figures: Partial<Record<FigureKey, BaselineFigureDto>>;
  tolerances: Partial<Record<FigureKey, number>>;
}

/**
 * Adds room, grid, source study and setter to baselines, in a few queries.
 */
export async function describeBaselines(
  baselines: Baseline[],
): Promise<DescribedBaseline[]> {
  if (baselines.length === 0) return [];
  const ids = (pick: (b: Baseline) => number) => [
    ...new Set(baselines.map(pick)),
  ];
  const [rooms, grids, studies, users] = await Promise.all([
    Room.findAll({ where: { id: ids((b) => b.roomId) } }),
    Grid.findAll({ where: { id: ids((b) => b.gridId) } }),
    Study.findAll({ where: { id: ids((b) => b.sourceStudyId) } }),
    User.findAll({ where: { id: ids((b) => b.setBy) } }),
  ]);
  const byId = <T extends { id: number }>(list: T[]) =>
    new Map(list.map((item) => [item.id, item]));
  const [roomMap, gridMap, studyMap, userMap] = [
    byId(rooms),
    byId(grids),
    byId(studies),
    byId(users),
  ];
  return baselines.map((baseline) => {
    const user = userMap.get(baseline.setBy);
    const study = studyMap.get(baseline.sourceStudyId);
    return {
      baseline,
      roomName: roomMap.get(baseline.roomId)?.name ?? '',
      gridLabel: gridMap.get(baseline.gridId)?.label ?? '',
      studyTitle: study?.title ?? '',
      sourceSignedAt: study?.signedAt ?? null,
      setBy: {
        id: baseline.setBy,
        displayName: user?.displayName ?? '',
        role: user?.role ?? 'physicist',
      },
    };
  });
}

/** The baselines of the ids given, described. */
export async function describeBaselinesByIds(
  ids: number[],
): Promise<DescribedBaseline[]> {
  if (ids.length === 0) return [];
  return describeBaselines(await Baseline.findAll({ where: { id: ids } }));
}

/** Baselines, newest first, optionally of one room or grid or state. */
export async function listBaselines(filter: {
  roomId?: number;
  gridId?: number;
  active?: boolean;
}): Promise<DescribedBaseline[]> {
  const where: WhereOptions<Baseline> = {};
  if (filter.roomId !== undefined) where.roomId = filter.roomId;
  if (filter.gridId !== undefined) where.gridId = filter.gridId;
  if (filter.active !== undefined) where.active = filter.active;
  const baselines = await Baseline.findAll({
    where,
    order: [
      ['setAt', 'DESC'],
      ['id', 'DESC'],
    ],
    limit: 1000,
  });
  return describeBaselines(baselines);
}

/** @throws AppError 404 when there is no such baseline. */
export async function findBaselineById(id: number): Promise<Baseline> {
  const baseline = await Baseline.findByPk(id);
  if (!baseline) throw notFound('baseline');
  return baseline;
}

/**
 * The active baselines of some rooms, for flagging (raw SQL, so the bench
 * can run it on its own database).
 * @param roomIds rooms to look in; none gives none.
 */
export async function activeBaselinesOf(
  roomIds: number[],
  db: Sequelize = sequelize,
): Promise<ActiveBaseline[]> {
  if (roomIds.length === 0) return [];
  return db.query<ActiveBaseline>(
    `SELECT b.id, b.room_id AS "roomId", b.grid_id AS "gridId", b.kvp,
            b.added_filtration AS "addedFiltration",
            b.phantom_thickness_cm AS "phantomThicknessCm",
            b.source_condition_id AS "sourceConditionId",
            s.signed_at AS "sourceSignedAt", b.figures, b.tolerances
       FROM baselines b JOIN studies s ON s.id = b.source_study_id
      WHERE b.active AND b.room_id IN (:roomIds)`,
    { type: QueryTypes.SELECT, replacements: { roomIds } },
  );
}

function checkTolerances(
  tolerances: Partial<Record<FigureKey, number>>,
  figures: readonly FigureKey[],
): void {
  const unknown = (Object.keys(tolerances) as FigureKey[]).filter(
    (key) => !figures.includes(key),
  );
  if (unknown.length > 0) {
    throw validationFailed(
      unknown.map((key) => ({
        path: `tolerances.${key}`,
        message: 'The baseline does not hold this figure.',
      })),
    );
  }
}

/**
 * Marks a signed study's condition as the baseline of its room + grid + kV
 * + filtration + phantom thickness, snapshotting its figures, with ±10 %
 * for each figure given no tolerance. An active baseline of the same match
 * is retired in the same transaction.
 * @throws AppError 404 for an unknown condition; 409 when the study is not
 *   signed or the condition has no finished analysis; 400 for a figure the
 *   condition does not have.
 */
export async function createBaseline(
  input: CreateBaselineInput,
  audit: AuditContext & { actorId: number },
): Promise<Baseline> {
  const condition = await StudyCondition.findByPk(input.conditionId);
  if (!condition) throw notFound('condition');
  const study = await Study.findByPk(condition.studyId);
  if (!study) throw notFound('study');
  if (study.status !== 'signed') {
    throw conflict('Only a signed study’s results can become a baseline.');
  }
  const analysis = await ConditionAnalysis.findOne({
    where: { conditionId: condition.id, status: 'done' },
  });
  if (!analysis) {
    throw conflict('This condition has no finished analysis to keep.');
  }
  const rows = await ConditionFigure.findAll({
    where: { analysisId: analysis.id },
  });
  const available = new Map(rows.map((row) => [row.figure, row]));
  const wanted = input.figures ?? rows.map((row) => row.figure);
  const missing = wanted.filter((key) => !available.has(key));
  if (missing.length > 0) {
    throw validationFailed(
      missing.map((key) => ({
        path: 'figures',
        message: `The condition has no ${key} figure.`,
      })),
    );
  }
  checkTolerances(input.tolerances, wanted);
  const figures: Partial<Record<FigureKey, BaselineFigureDto>> = {};
  const tolerances: Partial<Record<FigureKey, number>> = {};
  for (const key of wanted) {
    const row = available.get(key)!;
    figures[key] = {
      value: row.value,
      ciLow: row.ciLow,
      ciHigh: row.ciHigh,
      standardError: row.standardError,
      n: row.n,
    };
    tolerances[key] = input.tolerances[key] ?? DEFAULT_TOLERANCE_PERCENT;
  }
  const match = {
    roomId: study.roomId,
    gridId: condition.gridId,
    kvp: condition.kvp,
    filtrationKey: filtrationKey(condition.addedFiltration),
    phantomThicknessCm: condition.phantomThicknessCm,
  };
  return sequelize.transaction(async (transaction) => {
    const now = new Date();
    const previous = await Baseline.findAll({
      where: { ...match, active: true },
      transaction,
      lock: transaction.LOCK.UPDATE,
    });
    for (const old of previous) {
      await old.update(
        { active: false, retiredAt: now, retiredBy: audit.actorId },
        { transaction },
      );
    }
    const created = await Baseline.create(
      {
        ...match,
        addedFiltration: condition.addedFiltration,
        sourceStudyId: study.id,
        sourceRevision: study.revision,
        sourceConditionId: condition.id,
        sourceAnalysisId: analysis.id,
        figures,
        tolerances,
        note: input.note,
        setBy: audit.actorId,
        setAt: now,
      },
      { transaction },
    );
    await recordAudit(
      audit,
      {
        action: 'baseline.set',
        targetType: 'baseline',
        targetId: created.id,
        details: {
          studyId: study.id,
          revision: study.revision,
          conditionId: condition.id,
          tolerances,
          replaced: previous.map((b) => b.id),
        },
      },
      transaction,
    );
    return created;
  });
}

/**
 * Changes a baseline's tolerances or note, or retires it (`active: false`).
 * Tolerances given replace those of the same figures; others stay.
 * @throws AppError 409 for a retired baseline; 400 for a tolerance of a
 *   figure the baseline does not hold.
 */
export async function updateBaseline(
  baseline: Baseline,
  input: UpdateBaselineInput,
  audit: AuditContext & { actorId: number },
): Promise<Baseline> {
  if (!baseline.active) {
    throw conflict('This baseline is retired; set a new one instead.');
  }
  const figures = Object.keys(baseline.figures) as FigureKey[];
  if (input.tolerances) checkTolerances(input.tolerances, figures);
  return sequelize.transaction(async (transaction) => {
    const before = {
      tolerances: baseline.tolerances,
      note: baseline.note,
      active: baseline.active,
    };
    const retiring = input.active === false;
    await baseline.update(
      {
        tolerances: input.tolerances
          ? { ...baseline.tolerances, ...input.tolerances }
          : baseline.tolerances,
        note: input.note ?? baseline.note,
        ...(retiring
          ? { active: false, retiredAt: new Date(), retiredBy: audit.actorId }
          : {}),
      },
      { transaction },
    );
    await recordAudit(
      audit,
      {
        action: retiring ? 'baseline.retired' : 'baseline.changed',
        targetType: 'baseline',
        targetId: baseline.id,
        details: { before, change: input },
      },
      transaction,
    );
    return baseline;
  });
}

/** Deletes a baseline; the audit trail keeps what it held. */
export async function deleteBaseline(
  baseline: Baseline,
  audit: AuditContext,
): Promise<void> {
  await sequelize.transaction(async (transaction) => {
    await recordAudit(
      audit,
      {
        action: 'baseline.deleted',
        targetType: 'baseline',
        targetId: baseline.id,
        details: {
          roomId: baseline.roomId,
          gridId: baseline.gridId,
          kvp: baseline.kvp,
          phantomThicknessCm: baseline.phantomThicknessCm,
          sourceStudyId: baseline.sourceStudyId,
          figures: baseline.figures,
          tolerances: baseline.tolerances,
        },
      },
      transaction,
    );
    await baseline.destroy({ transaction });
  });
}
