import { QueryTypes, type Sequelize } from 'sequelize';
import type { FigureKey } from '../../shared/figures.ts';
import { FACT_FIGURES } from './compare-facts.service.ts';

/**
 * The comparison board's aggregates: one scan over the board's source rows
 * summing each figure at the finest grain, rolled up in memory into the
 * board's groupings. Sums, counts, minima and maxima are decomposable, so
 * the roll-up is exact.
 */

/** z for a two-sided 95 % normal interval. */
const Z_95 = 1.959964;

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
 * @param source the board's source relation (compare-facts.service.ts).
 * @param replacements its named replacements.
 * @returns the aggregates and the number of matching conditions.
 */
export async function aggregateBoard(
  db: Sequelize,
  source: string,
  replacements: Record<string, unknown>,
): Promise<{ total: number; aggregates: BoardAggregate[] }> {
  const fine = await db.query<SumsRow>(
    `SELECT f.grid_id, f.kvp, f.phantom_thickness_cm, f.room_id,
       count(*)::int AS conditions,
       count(*) FILTER (WHERE f.sif_low > 1)::int AS sif_above,
       count(*) FILTER (WHERE f.sif_high < 1)::int AS sif_below,
       ${FINE_SUMS}
       FROM (${source}) f
      GROUP BY f.grid_id, f.kvp, f.phantom_thickness_cm, f.room_id`,
    { type: QueryTypes.SELECT, replacements },
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
