import { QueryTypes, type Sequelize } from 'sequelize';
import type { GridVerdictOutcome } from '../../shared/analysis/verdict.ts';
import {
  predictTransmissions,
  predictedWithSpr,
  type PredictionOutcome,
} from '../../shared/compare/predicted-figures.ts';
import { filtrationKey } from '../../shared/compare/tolerance.ts';
import { DomainError } from '../../shared/errors.ts';
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

/**
 * The comparison board's queries: every condition the viewer may see that
 * matches the filters, its figures, and aggregates per grid, phantom
 * thickness and kV, per room and phantom thickness and per grid, all computed in PostgreSQL. The
 * viewer's scope (which study states) is part of every WHERE clause, so no
 * row outside it is ever read into the server.
 */

/** The figures the board aggregates. */
export const AGGREGATED_FIGURES: readonly FigureKey[] = [
  'snr_improvement_factor',
  'contrast_improvement_factor',
  'bucky_factor',
  'primary_transmission',
  'scatter_transmission',
  'selectivity',
];

/** z for a two-sided 95 % normal interval. */
const Z_95 = 1.959964;

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

/** Which grouping an aggregate row belongs to. */
export type AggregateGrouping =
  'grid-thickness-kv' | 'room-thickness' | 'grid' | 'figure';

/** One aggregate: a figure over the matching conditions of one group. */
export interface BoardAggregate {
  grouping: AggregateGrouping;
  figure: FigureKey;
  gridId: number | null;
  kvp: number | null;
  roomId: number | null;
  phantomThicknessCm: number | null;
  n: number;
  mean: number;
  sampleSd: number | null;
  /** Inverse-variance weighted mean, its 95 % interval (see below). */
  weightedMean: number;
  low: number;
  high: number;
  /** Conditions whose interval lies wholly above / below 1. */
  aboveOne: number;
  belowOne: number;
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

interface Where {
  sql: string;
  replacements: Record<string, unknown>;
}

const startOfDay = (date: string): string => `${date}T00:00:00Z`;
const dayAfter = (date: string): string => {
  const next = new Date(`${date}T00:00:00Z`);
  next.setUTCDate(next.getUTCDate() + 1);
  return next.toISOString();
};

/**
 * The SQL date of a study on the board: its signed date, or for an unsigned
 * study its created date.
 */
function studyDateSql(statuses: readonly StudyStatus[]): string {
  return statuses.length === 1 && statuses[0] === 'signed'
    ? 's.signed_at'
    : 'COALESCE(s.signed_at, s.created_at)';
}

/**
 * The WHERE clause of every board query over studies `s` and conditions
 * `sc`: the viewer's study states first, then each filter given.
 */
export function boardWhere(
  filters: BoardFilters,
  statuses: readonly StudyStatus[],
): Where {
  const parts = ['s.status IN (:statuses)'];
  const replacements: Record<string, unknown> = { statuses: [...statuses] };
  const add = (sql: string, name: string, value: unknown) => {
    parts.push(sql);
    replacements[name] = value;
  };
  if (filters.studyId !== undefined)
    add('s.id = :studyId', 'studyId', filters.studyId);
  if (filters.rooms?.length)
    add('s.room_id IN (:rooms)', 'rooms', filters.rooms);
  if (filters.detectors?.length) {
    add('s.detector_id IN (:detectors)', 'detectors', filters.detectors);
  }
  if (filters.grids?.length)
    add('sc.grid_id IN (:grids)', 'grids', filters.grids);
  if (filters.kvMin !== undefined)
    add('sc.kvp >= :kvMin', 'kvMin', filters.kvMin);
  if (filters.kvMax !== undefined)
    add('sc.kvp <= :kvMax', 'kvMax', filters.kvMax);
  if (filters.thicknessMin !== undefined) {
    add(
      'sc.phantom_thickness_cm >= :thicknessMin',
      'thicknessMin',
      filters.thicknessMin,
    );
  }
  if (filters.thicknessMax !== undefined) {
    add(
      'sc.phantom_thickness_cm <= :thicknessMax',
      'thicknessMax',
      filters.thicknessMax,
    );
  }
  const date = studyDateSql(statuses);
  if (filters.from)
    add(
      `${date} >= CAST(:from AS timestamptz)`,
      'from',
      startOfDay(filters.from),
    );
  if (filters.to)
    add(`${date} < CAST(:to AS timestamptz)`, 'to', dayAfter(filters.to));
  return { sql: parts.join(' AND '), replacements };
}

const MATCHED_CONDITIONS = `
  FROM studies s
  JOIN study_conditions sc ON sc.study_id = s.id
  JOIN condition_analyses ca ON ca.condition_id = sc.id AND ca.status = 'done'`;

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

interface AggregateRow {
  grouping: number;
  figure: FigureKey;
  grid_id: number | null;
  kvp: number | null;
  room_id: number | null;
  phantom_thickness_cm: number | null;
  n: number;
  mean: number;
  sample_sd: number | null;
  sum_wv: number | null;
  sum_w: number | null;
  min_ci_low: number;
  max_ci_high: number;
  above_one: number;
  below_one: number;
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
  where: Where,
  dateSql: string,
  limit: number,
): Promise<{ total: number; rows: ListRow[] }> {
  const [countRow] = await db.query<{ total: number }>(
    `SELECT count(*)::int AS total ${MATCHED_CONDITIONS} WHERE ${where.sql}`,
    { type: QueryTypes.SELECT, replacements: where.replacements },
  );
  const rows = await db.query<ListRow>(
    `SELECT sc.id AS condition_id, ca.id AS analysis_id, s.id AS study_id,
            s.title AS study_title, s.status AS study_status, s.revision,
            s.signed_at, u.display_name AS signed_by, ${dateSql} AS study_date,
            s.room_id, r.name AS room_name, s.detector_id, d.name AS detector_name,
            sc.grid_id, g.label AS grid_label, g.ratio AS grid_ratio,
            sc.kvp, sc.added_filtration, sc.hvl_mm_al, sc.phantom_thickness_cm,
            s.plan #>> '{phantom,material}' AS phantom_material,
            ca.verdict_outcome, ca.warnings,
            COALESCE(ca.result -> 'method', ca.result #> '{figures,method}') AS method
       ${MATCHED_CONDITIONS}
       JOIN rooms r ON r.id = s.room_id
       JOIN grids g ON g.id = sc.grid_id
       LEFT JOIN detectors d ON d.id = s.detector_id
       LEFT JOIN users u ON u.id = s.signed_by
      WHERE ${where.sql}
      ORDER BY study_date DESC, s.id DESC, sc.position, sc.id
      LIMIT :limit`,
    {
      type: QueryTypes.SELECT,
      replacements: { ...where.replacements, limit },
    },
  );
  return { total: countRow?.total ?? 0, rows };
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

// GROUPING() bits, in the order of its arguments below: grid, kvp, room,
// thickness; a set of bits means "not grouped by".
const GROUPINGS: Record<number, AggregateGrouping> = {
  0b0010: 'grid-thickness-kv',
  0b1100: 'room-thickness',
  0b0111: 'grid',
  0b1111: 'figure',
};

/**
 * Aggregates in one scan with grouping sets. Per group: n, the plain mean
 * and sample SD, and the inverse-variance weighted mean
 * ȳ = Σ(yᵢ/uᵢ²)/Σ(1/uᵢ²) with u(ȳ) = 1/√Σ(1/uᵢ²); the interval is the
 * condition's own for n = 1, else ȳ ± 1.96·u(ȳ) (a fixed-effect pooled
 * estimate), or the envelope of the intervals when no figure has an SE.
 * @see JCGM 100:2008 for u; Borenstein et al., Introduction to
 *   Meta-Analysis (2009) ch. 11, for the fixed-effect weighted mean.
 */
async function aggregates(
  db: Sequelize,
  where: Where,
): Promise<BoardAggregate[]> {
  const rows = await db.query<AggregateRow>(
    `SELECT GROUPING(sc.grid_id, sc.kvp, s.room_id, sc.phantom_thickness_cm)::int AS grouping,
            cf.figure, sc.grid_id, sc.kvp, s.room_id, sc.phantom_thickness_cm,
            count(*)::int AS n,
            avg(cf.value) AS mean,
            stddev_samp(cf.value) AS sample_sd,
            sum(cf.value / (cf.standard_error * cf.standard_error))
              FILTER (WHERE cf.standard_error > 0) AS sum_wv,
            sum(1 / (cf.standard_error * cf.standard_error))
              FILTER (WHERE cf.standard_error > 0) AS sum_w,
            min(cf.ci_low) AS min_ci_low,
            max(cf.ci_high) AS max_ci_high,
            count(*) FILTER (WHERE cf.ci_low > 1)::int AS above_one,
            count(*) FILTER (WHERE cf.ci_high < 1)::int AS below_one
       ${MATCHED_CONDITIONS}
       JOIN condition_figures cf ON cf.analysis_id = ca.id AND cf.figure IN (:figures)
      WHERE ${where.sql}
      GROUP BY GROUPING SETS (
        (cf.figure, sc.grid_id, sc.phantom_thickness_cm, sc.kvp),
        (cf.figure, s.room_id, sc.phantom_thickness_cm),
        (cf.figure, sc.grid_id),
        (cf.figure)
      )`,
    {
      type: QueryTypes.SELECT,
      replacements: { ...where.replacements, figures: AGGREGATED_FIGURES },
    },
  );
  return rows.flatMap((row) => {
    const grouping = GROUPINGS[row.grouping];
    if (!grouping) return [];
    const weighted =
      row.sum_w !== null && row.sum_w > 0 && row.sum_wv !== null
        ? { mean: row.sum_wv / row.sum_w, se: 1 / Math.sqrt(row.sum_w) }
        : null;
    const single = row.n === 1;
    const weightedMean = weighted ? weighted.mean : row.mean;
    return [
      {
        grouping,
        figure: row.figure,
        gridId: row.grid_id,
        kvp: row.kvp,
        roomId: row.room_id,
        phantomThicknessCm: row.phantom_thickness_cm,
        n: row.n,
        mean: row.mean,
        sampleSd: single ? null : row.sample_sd,
        weightedMean: single ? row.mean : weightedMean,
        low:
          single || !weighted
            ? row.min_ci_low
            : weighted.mean - Z_95 * weighted.se,
        high:
          single || !weighted
            ? row.max_ci_high
            : weighted.mean + Z_95 * weighted.se,
        aboveOne: row.above_one,
        belowOne: row.below_one,
      },
    ];
  });
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
    const rows = await db.query<Record<string, unknown>>(
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
    for (const row of rows)
      grids.set(row.id as number, row as unknown as BoardGrid);
  }
  return { rooms, grids };
}

/**
 * Runs the board's queries for a viewer's scope.
 * @param filters parsed filters.
 * @param statuses the study states the viewer may see (compare.policy.ts).
 * @param limit conditions listed at most; aggregates cover every match.
 * @param db the database (the app's by default; the bench passes its own).
 * @returns the matching count, the listed conditions with their figures,
 *   aggregates, and the names of rooms and grids they mention.
 */
export async function queryCompareBoard(
  filters: BoardFilters,
  statuses: readonly StudyStatus[],
  limit: number,
  db: Sequelize = sequelize,
): Promise<BoardData> {
  const where = boardWhere(filters, statuses);
  const [{ total, rows }, aggregateRows] = await Promise.all([
    listConditions(db, where, studyDateSql(statuses), limit),
    aggregates(db, where),
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

const PREDICTION_CACHE_LIMIT = 500;
const predictionCache = new Map<string, PredictionOutcome>();

function predictionKey(
  grid: BoardGrid,
  kvp: number,
  layers: FilterLayer[],
): string {
  return JSON.stringify([
    grid.ratio,
    grid.stripFrequencyPerCm,
    grid.stripHeightUm,
    grid.interspaceWidthUm,
    grid.stripThicknessUm,
    grid.stripMaterial,
    grid.interspaceMaterial,
    kvp,
    filtrationKey(layers),
  ]);
}

/**
 * Tp, Ts and Σ predicted from each listed condition's grid construction at
 * its beam quality, and K, B, SIF with the condition's measured SPR; null
 * where the grid's construction or interspace is not recorded. Predictions
 * are remembered per construction and beam (they take ~20 ms each).
 * @returns predictions by condition id.
 */
export function predictionsFor(
  conditions: readonly BoardConditionRow[],
  grids: ReadonlyMap<number, BoardGrid>,
): Map<number, PredictedForConditionDto> {
  const predicted = new Map<number, PredictedForConditionDto>();
  for (const condition of conditions) {
    const grid = grids.get(condition.gridId);
    if (!grid) continue;
    const key = predictionKey(grid, condition.kvp, condition.addedFiltration);
    let outcome = predictionCache.get(key);
    if (!outcome) {
      try {
        outcome = predictTransmissions(
          grid,
          condition.kvp,
          condition.addedFiltration,
        );
      } catch (error) {
        if (!(error instanceof DomainError)) throw error;
        outcome = { available: false, reason: error.message };
      }
      if (predictionCache.size >= PREDICTION_CACHE_LIMIT)
        predictionCache.clear();
      predictionCache.set(key, outcome);
    }
    if (!outcome.available) continue;
    const spr = condition.figures.scatter_to_primary_ratio?.value;
    const { prediction } = outcome;
    predicted.set(condition.conditionId, {
      primaryTransmission: prediction.primaryTransmission,
      scatterTransmission: prediction.scatterTransmission,
      selectivity: prediction.selectivity,
      withMeasuredSpr:
        spr !== undefined && spr >= 0
          ? { scatterToPrimaryRatio: spr, ...predictedWithSpr(prediction, spr) }
          : null,
      assumptions: prediction.assumptions,
    });
  }
  return predicted;
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

/**
 * Rooms, grids and detectors the board can filter by, by name.
 */
export async function boardOptions(db: Sequelize = sequelize): Promise<{
  rooms: Array<{ id: number; name: string; site: string }>;
  grids: Array<{ id: number; label: string; ratio: number | null }>;
  detectors: Array<{ id: number; name: string; roomId: number }>;
}> {
  const [rooms, grids, detectors] = await Promise.all([
    db.query<{ id: number; name: string; site: string }>(
      'SELECT id, name, site FROM rooms ORDER BY name',
      { type: QueryTypes.SELECT },
    ),
    db.query<{ id: number; label: string; ratio: number | null }>(
      'SELECT id, label, ratio FROM grids ORDER BY label',
      { type: QueryTypes.SELECT },
    ),
    db.query<{ id: number; name: string; roomId: number }>(
      'SELECT id, name, room_id AS "roomId" FROM detectors ORDER BY name',
      { type: QueryTypes.SELECT },
    ),
  ]);
  return { rooms, grids, detectors };
}

/** The board's filters in words, for a report's cover. */
export async function describeBoardFilters(
  filters: BoardFilters,
  db: Sequelize = sequelize,
): Promise<string[]> {
  const names = async (sql: string, ids: number[] | undefined) =>
    ids?.length
      ? (
          await db.query<{ name: string }>(sql, {
            type: QueryTypes.SELECT,
            replacements: { ids },
          })
        ).map((r) => r.name)
      : [];
  const [rooms, grids, detectors] = await Promise.all([
    names(
      'SELECT name FROM rooms WHERE id IN (:ids) ORDER BY name',
      filters.rooms,
    ),
    names(
      'SELECT label AS name FROM grids WHERE id IN (:ids) ORDER BY label',
      filters.grids,
    ),
    names(
      'SELECT name FROM detectors WHERE id IN (:ids) ORDER BY name',
      filters.detectors,
    ),
  ]);
  const range = (label: string, unit: string, min?: number, max?: number) =>
    min === undefined && max === undefined
      ? []
      : [`${label} ${min ?? 'any'}–${max ?? 'any'} ${unit}`];
  return [
    ...(rooms.length ? [`rooms: ${rooms.join(', ')}`] : []),
    ...(grids.length ? [`grids: ${grids.join(', ')}`] : []),
    ...(detectors.length ? [`detectors: ${detectors.join(', ')}`] : []),
    ...range('tube voltage', 'kV', filters.kvMin, filters.kvMax),
    ...range(
      'phantom thickness',
      'cm',
      filters.thicknessMin,
      filters.thicknessMax,
    ),
    ...(filters.from || filters.to
      ? [`studies dated ${filters.from ?? 'any'} to ${filters.to ?? 'any'}`]
      : []),
  ];
}
