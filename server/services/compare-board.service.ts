import { QueryTypes, type Sequelize } from 'sequelize';
import type { GridVerdictOutcome } from '../../shared/analysis/verdict.ts';
import type { MaterialId } from '../../shared/physics/attenuation.ts';
import type { FigureKey } from '../../shared/figures.ts';
import type {
  CompareMethodDto,
  CompareQuery,
  FigureValueDto,
  PredictedForConditionDto,
} from '../../shared/schemas/compare.schema.ts';
import type {
  FilterLayer,
  PhantomMaterial,
  StudyStatus,
} from '../../shared/schemas/study.schema.ts';
import type { Warning } from '../../shared/warnings.ts';
import { sequelize } from '../db/sequelize.ts';
import { activeBaselinesOf, type ActiveBaseline } from './baseline.service.ts';
import {
  aggregateBoard,
  type BoardAggregate,
} from './compare-aggregates.service.ts';
import {
  boardSource,
  refreshBoardFacts,
  type SourceFilters,
} from './compare-facts.service.ts';
import { predictionsFor } from './compare-predictions.service.ts';

/**
 * The comparison board's queries: every condition the viewer may see that
 * matches the filters, its figures, and aggregates per grid, phantom
 * thickness and kV, per room and phantom thickness and per grid. Counting,
 * listing and summing run in PostgreSQL over the board's source rows
 * (compare-facts.service.ts); the viewer's scope (which study states)
 * decides which rows the source holds, so no row outside it is read.
 */

export type {
  AggregateGrouping,
  BoardAggregate,
} from './compare-aggregates.service.ts';

/** Filters of the board, as parsed from the query string. */
export type BoardFilters = Omit<CompareQuery, 'limit' | 'drafts'> & {
  /** One study only (its report and results export). */
  studyId?: number;
};

/** One condition as the board's list query reads it. */
export interface BoardConditionRow {
  conditionId: number;
  analysisId: number;
  studyId: number;
  studyTitle: string;
  studyStatus: StudyStatus;
  revision: number;
  signedAt: Date | null;
  signedBy: string | null;
  studyDate: Date;
  roomId: number;
  roomName: string;
  detectorId: number | null;
  detectorName: string | null;
  gridId: number;
  gridLabel: string;
  gridRatio: number | null;
  kvp: number;
  addedFiltration: FilterLayer[];
  hvlMmAl: number | null;
  phantomThicknessCm: number;
  phantomMaterial: PhantomMaterial | null;
  verdictOutcome: GridVerdictOutcome | null;
  warnings: Warning[];
  method: CompareMethodDto | null;
  figures: Partial<Record<FigureKey, FigureValueDto>>;
}

/** The board's raw result before presentation. */
export interface BoardData {
  total: number;
  conditions: BoardConditionRow[];
  aggregates: BoardAggregate[];
  rooms: Map<number, string>;
  grids: Map<number, BoardGrid>;
}

/** What the board shows of a grid. */
export interface BoardGrid {
  id: number;
  label: string;
  ratio: number | null;
  stripFrequencyPerCm: number | null;
  stripHeightUm: number | null;
  interspaceWidthUm: number | null;
  stripThicknessUm: number | null;
  stripMaterial: MaterialId | null;
  interspaceMaterial: MaterialId | null;
  focusDistanceCm: number | null;
  statedTp: number | null;
  statedTs: number | null;
  statedContrastImprovementFactor: number | null;
  statedBuckyFactor: number | null;
  statedSelectivity: number | null;
  statedFiguresNote: string | null;
}

interface Where extends SourceFilters {
  replacements: Record<string, unknown>;
}

const startOfDay = (date: string): string => `${date}T00:00:00Z`;
const dayAfter = (date: string): string => {
  const next = new Date(`${date}T00:00:00Z`);
  next.setUTCDate(next.getUTCDate() + 1);
  return next.toISOString();
};

/** Each filter's column in the facts table and in the base tables. */
const FILTER_COLUMNS = {
  study: ['study_id', 's.id'],
  room: ['room_id', 's.room_id'],
  detector: ['detector_id', 's.detector_id'],
  grid: ['grid_id', 'sc.grid_id'],
  kvp: ['kvp', 'sc.kvp'],
  thickness: ['phantom_thickness_cm', 'sc.phantom_thickness_cm'],
  // A study's date: signed date, or for an unsigned study its creation.
  date: ['signed_at', 'COALESCE(s.signed_at, s.created_at)'],
} as const;

/**
 * The WHERE clauses of a board query, over the signed facts and over the
 * base tables (unsigned studies), with their replacements; the viewer's
 * unsigned states go in `:unsigned`, and with no filter the clause is TRUE.
 */
export function boardWhere(
  filters: BoardFilters,
  statuses: readonly StudyStatus[],
): Where {
  const facts: string[] = ['TRUE'];
  const live: string[] = ['TRUE'];
  const replacements: Record<string, unknown> = {
    unsigned: statuses.filter((s) => s !== 'signed'),
  };
  const add = (
    column: keyof typeof FILTER_COLUMNS,
    operator: string,
    name: string,
    value: unknown,
  ) => {
    const [fact, base] = FILTER_COLUMNS[column];
    facts.push(`${fact} ${operator}`);
    live.push(`${base} ${operator}`);
    replacements[name] = value;
  };
  if (filters.studyId !== undefined)
    add('study', '= :studyId', 'studyId', filters.studyId);
  if (filters.rooms?.length) add('room', 'IN (:rooms)', 'rooms', filters.rooms);
  if (filters.detectors?.length)
    add('detector', 'IN (:detectors)', 'detectors', filters.detectors);
  if (filters.grids?.length) add('grid', 'IN (:grids)', 'grids', filters.grids);
  if (filters.kvMin !== undefined)
    add('kvp', '>= :kvMin', 'kvMin', filters.kvMin);
  if (filters.kvMax !== undefined)
    add('kvp', '<= :kvMax', 'kvMax', filters.kvMax);
  if (filters.thicknessMin !== undefined) {
    add('thickness', '>= :thicknessMin', 'thicknessMin', filters.thicknessMin);
  }
  if (filters.thicknessMax !== undefined) {
    add('thickness', '<= :thicknessMax', 'thicknessMax', filters.thicknessMax);
  }
  if (filters.from)
    add(
      'date',
      '>= CAST(:from AS timestamptz)',
      'from',
      startOfDay(filters.from),
    );
  if (filters.to)
    add('date', '< CAST(:to AS timestamptz)', 'to', dayAfter(filters.to));
  return {
    facts: facts.join(' AND '),
    live: live.join(' AND '),
    replacements,
  };
}

interface ListRow {
  condition_id: number;
  analysis_id: number;
  study_id: number;
  study_title: string;
  study_status: StudyStatus;
  revision: number;
  signed_at: Date | null;
  signed_by: string | null;
  study_date: Date;
  room_id: number;
  room_name: string;
  detector_id: number | null;
  detector_name: string | null;
  grid_id: number;
  grid_label: string;
  grid_ratio: number | null;
  kvp: number;
  added_filtration: FilterLayer[];
  hvl_mm_al: number | null;
  phantom_thickness_cm: number;
  phantom_material: PhantomMaterial | null;
  verdict_outcome: GridVerdictOutcome | null;
  warnings: Warning[] | null;
  method: Record<string, unknown> | null;
}

interface FigureRow {
  analysis_id: number;
  figure: FigureKey;
  value: number;
  standard_error: number;
  ci_low: number;
  ci_high: number;
  degrees_of_freedom: number | null;
  n: number;
  basis: string;
}

const text = (value: unknown): string | null =>
  typeof value === 'string' ? value : null;

/** The method facts of a stored analysis result, whatever else it holds. */
export function methodOf(
  stored: Record<string, unknown> | null,
): CompareMethodDto | null {
  if (!stored || typeof stored !== 'object') return null;
  const signal = Array.isArray(stored.signal)
    ? stored.signal.filter((s): s is string => typeof s === 'string')
    : text(stored.signal)
      ? [text(stored.signal)!]
      : [];
  return {
    cnrDefinition: text(stored.cnrDefinition),
    cnr: text(stored.cnr) ?? text(stored.label),
    doseMeasure: text(stored.doseMeasure),
    doseLabel: text(stored.doseLabel),
    signal,
    uncertainty: text(stored.uncertainty),
  };
}

async function listConditions(
  db: Sequelize,
  source: string,
  where: Where,
  limit: number,
): Promise<ListRow[]> {
  const page = await db.query<{ condition_id: number }>(
    `SELECT f.condition_id FROM (${source}) f
      ORDER BY f.study_date DESC, f.study_id DESC, f.position, f.condition_id
      LIMIT :limit`,
    {
      type: QueryTypes.SELECT,
      replacements: { ...where.replacements, limit },
    },
  );
  if (page.length === 0) return [];
  const rows = await db.query<ListRow>(
    `SELECT sc.id AS condition_id, ca.id AS analysis_id, s.id AS study_id,
            s.title AS study_title, s.status AS study_status, s.revision,
            s.signed_at, u.display_name AS signed_by,
            COALESCE(s.signed_at, s.created_at) AS study_date,
            s.room_id, r.name AS room_name, s.detector_id, d.name AS detector_name,
            sc.grid_id, g.label AS grid_label, g.ratio AS grid_ratio,
            sc.kvp, sc.added_filtration, sc.hvl_mm_al, sc.phantom_thickness_cm,
            s.plan #>> '{phantom,material}' AS phantom_material,
            ca.verdict_outcome, ca.warnings,
            ca.result #> '{analysis,method}' AS method
       FROM study_conditions sc
       JOIN studies s ON s.id = sc.study_id
       JOIN condition_analyses ca ON ca.condition_id = sc.id
       JOIN rooms r ON r.id = s.room_id
       JOIN grids g ON g.id = sc.grid_id
       LEFT JOIN detectors d ON d.id = s.detector_id
       LEFT JOIN users u ON u.id = s.signed_by
      WHERE sc.id IN (:ids)`,
    {
      type: QueryTypes.SELECT,
      replacements: { ids: page.map((p) => p.condition_id) },
    },
  );
  const order = new Map(page.map((p, i) => [p.condition_id, i]));
  rows.sort((a, b) => order.get(a.condition_id)! - order.get(b.condition_id)!);
  return rows;
}

async function figuresOf(
  db: Sequelize,
  analysisIds: number[],
): Promise<Map<number, Partial<Record<FigureKey, FigureValueDto>>>> {
  const byAnalysis = new Map<
    number,
    Partial<Record<FigureKey, FigureValueDto>>
  >();
  if (analysisIds.length === 0) return byAnalysis;
  const rows = await db.query<FigureRow>(
    `SELECT analysis_id, figure, value, standard_error, ci_low, ci_high,
            degrees_of_freedom, n, basis
       FROM condition_figures WHERE analysis_id IN (:ids)`,
    { type: QueryTypes.SELECT, replacements: { ids: analysisIds } },
  );
  for (const row of rows) {
    const figures = byAnalysis.get(row.analysis_id) ?? {};
    figures[row.figure] = {
      value: row.value,
      standardError: row.standard_error,
      ciLow: row.ci_low,
      ciHigh: row.ci_high,
      degreesOfFreedom: row.degrees_of_freedom,
      n: row.n,
      basis: row.basis,
    };
    byAnalysis.set(row.analysis_id, figures);
  }
  return byAnalysis;
}

async function namesOf(
  db: Sequelize,
  roomIds: number[],
  gridIds: number[],
): Promise<{ rooms: Map<number, string>; grids: Map<number, BoardGrid> }> {
  const rooms = new Map<number, string>();
  const grids = new Map<number, BoardGrid>();
  if (roomIds.length > 0) {
    const rows = await db.query<{ id: number; name: string }>(
      'SELECT id, name FROM rooms WHERE id IN (:ids)',
      { type: QueryTypes.SELECT, replacements: { ids: roomIds } },
    );
    for (const row of rows) rooms.set(row.id, row.name);
  }
  if (gridIds.length > 0) {
    const rows = await db.query<BoardGrid>(
      `SELECT id, label, ratio, strip_frequency_per_cm AS "stripFrequencyPerCm",
              strip_height_um AS "stripHeightUm", interspace_width_um AS "interspaceWidthUm",
              strip_thickness_um AS "stripThicknessUm", strip_material AS "stripMaterial",
              interspace_material AS "interspaceMaterial", focus_distance_cm AS "focusDistanceCm",
              stated_tp AS "statedTp", stated_ts AS "statedTs",
              stated_contrast_improvement_factor AS "statedContrastImprovementFactor",
              stated_bucky_factor AS "statedBuckyFactor", stated_selectivity AS "statedSelectivity",
              stated_figures_note AS "statedFiguresNote"
         FROM grids WHERE id IN (:ids)`,
      { type: QueryTypes.SELECT, replacements: { ids: gridIds } },
    );
    for (const row of rows) grids.set(row.id, row);
  }
  return { rooms, grids };
}

/**
 * Runs the board's queries for a viewer's scope: brings the signed facts
 * up to date, then counts, lists and aggregates the matching conditions.
 * @param filters parsed filters.
 * @param statuses the study states the viewer may see (compare.policy.ts).
 * @param limit conditions listed at most; aggregates cover every match.
 * @param db the database (the app's by default; the bench passes its own).
 * @returns the matching count, the listed conditions (newest first) with
 *   their figures, aggregates, and the names of rooms and grids they mention.
 */
export async function queryCompareBoard(
  filters: BoardFilters,
  statuses: readonly StudyStatus[],
  limit: number,
  db: Sequelize = sequelize,
): Promise<BoardData> {
  if (statuses.includes('signed')) await refreshBoardFacts(db);
  const where = boardWhere(filters, statuses);
  const source = boardSource(statuses, where);
  const [rows, { total, aggregates: aggregateRows }] = await Promise.all([
    listConditions(db, source, where, limit),
    aggregateBoard(db, source, where.replacements),
  ]);
  const figures = await figuresOf(
    db,
    rows.map((row) => row.analysis_id),
  );
  const roomIds = new Set<number>(rows.map((row) => row.room_id));
  const gridIds = new Set<number>(rows.map((row) => row.grid_id));
  for (const a of aggregateRows) {
    if (a.roomId !== null) roomIds.add(a.roomId);
    if (a.gridId !== null) gridIds.add(a.gridId);
  }
  const { rooms, grids } = await namesOf(db, [...roomIds], [...gridIds]);
  return {
    total,
    aggregates: aggregateRows,
    rooms,
    grids,
    conditions: rows.map((row) => ({
      conditionId: row.condition_id,
      analysisId: row.analysis_id,
      studyId: row.study_id,
      studyTitle: row.study_title,
      studyStatus: row.study_status,
      revision: row.revision,
      signedAt: row.signed_at,
      signedBy: row.signed_by,
      studyDate: row.study_date,
      roomId: row.room_id,
      roomName: row.room_name,
      detectorId: row.detector_id,
      detectorName: row.detector_name,
      gridId: row.grid_id,
      gridLabel: row.grid_label,
      gridRatio: row.grid_ratio,
      kvp: row.kvp,
      addedFiltration: row.added_filtration ?? [],
      hvlMmAl: row.hvl_mm_al,
      phantomThicknessCm: row.phantom_thickness_cm,
      phantomMaterial: row.phantom_material,
      verdictOutcome: row.verdict_outcome,
      warnings: row.warnings ?? [],
      method: methodOf(row.method),
      figures: figures.get(row.analysis_id) ?? {},
    })),
  };
}

/** The board's rows with the baselines and predictions that go with them. */
export interface LoadedBoard {
  data: BoardData;
  baselines: ActiveBaseline[];
  predictions: Map<number, PredictedForConditionDto>;
}

/**
 * Runs {@link queryCompareBoard}, then loads the active baselines of the
 * listed conditions' rooms and predicts each listed condition's figures.
 */
export async function loadBoard(
  filters: BoardFilters,
  statuses: readonly StudyStatus[],
  limit: number,
  db: Sequelize = sequelize,
): Promise<LoadedBoard> {
  const data = await queryCompareBoard(filters, statuses, limit, db);
  const baselines = await activeBaselinesOf(
    [...new Set(data.conditions.map((c) => c.roomId))],
    db,
  );
  return {
    data,
    baselines,
    predictions: predictionsFor(data.conditions, data.grids),
  };
}
