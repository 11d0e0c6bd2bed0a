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
import {
  FACT_FIGURES,
  boardSource,
  refreshBoardFacts,
  type SourceFilters,
} from './compare-facts.service.ts';

/**
 * The comparison board's queries: every condition the viewer may see that
 * matches the filters, its figures, and aggregates per grid, phantom
 * thickness and kV, per room and phantom thickness and per grid. Counting,
 * listing and summing run in PostgreSQL over the board's source rows
 * (compare-facts.service.ts); the viewer's scope (which study states)
 * decides which rows the source holds, so no row outside it is read.
 */

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

/** Running sums of one figure over one group; all decomposable. */
interface Sums {
  n: number;
  sum: number;
  sumSquares: number;
  sumWeights: number;
  sumWeighted: number;
  minLow: number;
  maxHigh: number;
  aboveOne: number;
  belowOne: number;
}

const emptySums = (): Sums => ({
  n: 0,
  sum: 0,
  sumSquares: 0,
  sumWeights: 0,
  sumWeighted: 0,
  minLow: Infinity,
  maxHigh: -Infinity,
  aboveOne: 0,
  belowOne: 0,
});

function addSums(into: Sums, from: Sums): void {
  into.n += from.n;
  into.sum += from.sum;
  into.sumSquares += from.sumSquares;
  into.sumWeights += from.sumWeights;
  into.sumWeighted += from.sumWeighted;
  into.minLow = Math.min(into.minLow, from.minLow);
  into.maxHigh = Math.max(into.maxHigh, from.maxHigh);
  into.aboveOne += from.aboveOne;
  into.belowOne += from.belowOne;
}

/**
 * Per-group statistics from sums: n, the plain mean and sample SD, and the
 * inverse-variance weighted mean ȳ = Σ(yᵢ/uᵢ²)/Σ(1/uᵢ²) with
 * u(ȳ) = 1/√Σ(1/uᵢ²); the interval is the condition's own for n = 1, else
 * ȳ ± 1.96·u(ȳ) (a fixed-effect pooled estimate), or the envelope of the
 * intervals when no figure has an SE.
 * @see JCGM 100:2008 for u; Borenstein et al., Introduction to
 *   Meta-Analysis (2009) ch. 11, for the fixed-effect weighted mean.
 */
function statistics(
  s: Sums,
): Pick<
  BoardAggregate,
  | 'n'
  | 'mean'
  | 'sampleSd'
  | 'weightedMean'
  | 'low'
  | 'high'
  | 'aboveOne'
  | 'belowOne'
> {
  const mean = s.sum / s.n;
  const single = s.n === 1;
  const weighted =
    !single && s.sumWeights > 0
      ? { mean: s.sumWeighted / s.sumWeights, se: 1 / Math.sqrt(s.sumWeights) }
      : null;
  return {
    n: s.n,
    mean,
    // Only figures the charts spread carry squares (NaN marks the others).
    sampleSd:
      single || Number.isNaN(s.sumSquares)
        ? null
        : Math.sqrt(
            Math.max(0, (s.sumSquares - (s.sum * s.sum) / s.n) / (s.n - 1)),
          ),
    weightedMean: weighted ? weighted.mean : mean,
    low: weighted ? weighted.mean - Z_95 * weighted.se : s.minLow,
    high: weighted ? weighted.mean + Z_95 * weighted.se : s.maxHigh,
    aboveOne: s.aboveOne,
    belowOne: s.belowOne,
  };
}

// Charts show a spread (sample SD) for these; only the SIF decides verdicts.
const WITH_SPREAD = new Set(['sif', 'cif', 'bucky']);

const FINE_SUMS = FACT_FIGURES.flatMap(([p]) => [
  `count(f.${p}_value)::int AS ${p}_n`,
  `sum(f.${p}_value) AS ${p}_sum`,
  `sum(f.${p}_weight) AS ${p}_w`,
  `sum(f.${p}_value * f.${p}_weight) AS ${p}_wv`,
  `min(f.${p}_low) AS ${p}_low`,
  `max(f.${p}_high) AS ${p}_high`,
  ...(WITH_SPREAD.has(p)
    ? [`sum(f.${p}_value * f.${p}_value) AS ${p}_sq`]
    : []),
]).join(',\n       ');

type SumsRow = Record<string, number | null> & {
  grid_id: number;
  kvp: number;
  phantom_thickness_cm: number;
  room_id: number;
  conditions: number;
  sif_above: number;
  sif_below: number;
};

type GroupKey = Omit<BoardAggregate, keyof ReturnType<typeof statistics>>;

function sumsFrom(row: SumsRow, p: string): Sums | null {
  const n = row[`${p}_n`] ?? 0;
  if (n === 0) return null;
  return {
    n,
    sum: row[`${p}_sum`]!,
    sumSquares: row[`${p}_sq`] ?? Number.NaN,
    sumWeights: row[`${p}_w`] ?? 0,
    sumWeighted: row[`${p}_wv`] ?? 0,
    minLow: row[`${p}_low`]!,
    maxHigh: row[`${p}_high`]!,
    aboveOne: p === 'sif' ? row.sif_above : 0,
    belowOne: p === 'sif' ? row.sif_below : 0,
  };
}

/**
 * Counts and aggregates the matching conditions in one scan at the finest
 * grain (grid, kV, thickness, room), then rolls the sums up in memory into
 * the board's groupings: per grid, thickness and kV; per room and
 * thickness; per grid; and over all. One wide scan costs less than several
 * narrow ones.
 * @returns the aggregates and the number of matching conditions.
 */
async function aggregates(
  db: Sequelize,
  source: string,
  where: Where,
): Promise<{ total: number; aggregates: BoardAggregate[] }> {
  const fine = await db.query<SumsRow>(
    `SELECT f.grid_id, f.kvp, f.phantom_thickness_cm, f.room_id,
       count(*)::int AS conditions,
       count(*) FILTER (WHERE f.sif_low > 1)::int AS sif_above,
       count(*) FILTER (WHERE f.sif_high < 1)::int AS sif_below,
       ${FINE_SUMS}
       FROM (${source}) f
      GROUP BY f.grid_id, f.kvp, f.phantom_thickness_cm, f.room_id`,
    { type: QueryTypes.SELECT, replacements: where.replacements },
  );
  const groups = new Map<string, { key: GroupKey; sums: Sums }>();
  // Keys are built as text and the key object only for a new group: the
  // roll-up visits every fine row four times per figure.
  const add = (id: string, makeKey: () => GroupKey, sums: Sums) => {
    let group = groups.get(id);
    if (!group) {
      group = { key: makeKey(), sums: emptySums() };
      groups.set(id, group);
    }
    addSums(group.sums, sums);
  };
  const none = {
    gridId: null,
    kvp: null,
    roomId: null,
    phantomThicknessCm: null,
  };
  let total = 0;
  for (const row of fine) {
    total += row.conditions;
    const { grid_id: gridId, kvp, room_id: roomId } = row;
    const thickness = row.phantom_thickness_cm;
    for (const [p, figure] of FACT_FIGURES) {
      const sums = sumsFrom(row, p);
      if (!sums) continue;
      add(`f|${p}`, () => ({ ...none, grouping: 'figure', figure }), sums);
      add(
        `g|${p}|${gridId}`,
        () => ({ ...none, grouping: 'grid', figure, gridId }),
        sums,
      );
      add(
        `gtk|${p}|${gridId}|${thickness}|${kvp}`,
        () => ({
          ...none,
          grouping: 'grid-thickness-kv',
          figure,
          gridId,
          kvp,
          phantomThicknessCm: thickness,
        }),
        sums,
      );
      add(
        `rt|${p}|${roomId}|${thickness}`,
        () => ({
          ...none,
          grouping: 'room-thickness',
          figure,
          roomId,
          phantomThicknessCm: thickness,
        }),
        sums,
      );
    }
  }
  return {
    total,
    aggregates: [...groups.values()].map(({ key, sums }) => ({
      ...key,
      ...statistics(sums),
    })),
  };
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
    aggregates(db, source, where),
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
