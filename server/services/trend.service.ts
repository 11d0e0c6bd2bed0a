import { QueryTypes, type Sequelize } from 'sequelize';
import { SAFETY_CAUTIONS } from '../../shared/cautions.ts';
import {
  baselinesByMatch,
  checkAgainstBaseline,
} from '../../shared/compare/baseline-check.ts';
import {
  TOLERANCE_POLICY_NOTE,
  conditionMatchKey,
  toleranceBand,
  toleranceFlag,
  DEFAULT_TOLERANCE_PERCENT,
} from '../../shared/compare/tolerance.ts';
import {
  summariseVerdicts,
  verdictOutcome,
  type VerdictCounts,
} from '../../shared/compare/verdict-wording.ts';
import type { FigureKey } from '../../shared/figures.ts';
import { figureDefinition } from '../../shared/figures.ts';
import type {
  BaselineDto,
  RoomStatus,
  RoomSummaryDto,
  TrendGroupDto,
  TrendSeriesDto,
} from '../../shared/schemas/compare.schema.ts';
import type { FilterLayer } from '../../shared/schemas/study.schema.ts';
import { describeFiltration } from '../../shared/studies/expected-acquisitions.ts';
import { sequelize } from '../db/sequelize.ts';
import { notFound } from '../errors.ts';
import { Room } from '../models/room.model.ts';
import { activeBaselinesOf, type ActiveBaseline } from './baseline.service.ts';
import { queryCompareBoard } from './compare-board.service.ts';

/**
 * Trends per room (each figure of each condition match over the room's
 * signed studies, beside its baseline band) and the room summary (the
 * latest signed study of every room against its baselines). Both read
 * signed studies only, for every viewer.
 */

/** Figures a trend shows unless others are asked for. */
export const DEFAULT_TREND_FIGURES: readonly FigureKey[] = [
  'snr_improvement_factor',
  'contrast_improvement_factor',
  'bucky_factor',
  'total_transmission',
  'primary_transmission',
];

interface TrendRow {
  condition_id: number;
  study_id: number;
  study_title: string;
  signed_at: Date;
  grid_id: number;
  grid_label: string;
  kvp: number;
  added_filtration: FilterLayer[];
  phantom_thickness_cm: number;
  figure: FigureKey;
  value: number;
  ci_low: number;
  ci_high: number;
}

interface GroupBuild {
  group: TrendGroupDto;
  baseline: ActiveBaseline | null;
  series: Map<FigureKey, TrendSeriesDto>;
}

function seriesFor(
  figure: FigureKey,
  baseline: ActiveBaseline | null,
): TrendSeriesDto {
  const d = figureDefinition(figure);
  const reference = baseline?.figures[figure];
  const tolerance = baseline?.tolerances[figure] ?? DEFAULT_TOLERANCE_PERCENT;
  return {
    figure,
    label: d.label,
    symbol: d.symbol,
    unit: d.unit,
    band: reference
      ? {
          baselineValue: reference.value,
          tolerancePercent: tolerance,
          ...toleranceBand(reference.value, tolerance),
        }
      : null,
    points: [],
  };
}

/**
 * Every condition match (grid, kV, filtration, thickness) measured in the
 * room's signed studies, with each figure over time and, where an active
 * baseline exists, its band and a flag on each later point.
 * @param roomId the room.
 * @param figures the figures to follow (DEFAULT_TREND_FIGURES by default).
 * @param describe turns the active baselines into their DTOs.
 * @throws AppError 404 for an unknown room.
 */
export async function roomTrend(
  roomId: number,
  figures: readonly FigureKey[],
  describe: (ids: number[]) => Promise<Map<number, BaselineDto>>,
  db: Sequelize = sequelize,
): Promise<{ room: Room; groups: TrendGroupDto[]; policyNote: string }> {
  const room = await Room.findByPk(roomId);
  if (!room) throw notFound('room');
  const [rows, baselines] = await Promise.all([
    db.query<TrendRow>(
      `SELECT sc.id AS condition_id, s.id AS study_id, s.title AS study_title,
              s.signed_at, sc.grid_id, g.label AS grid_label, sc.kvp,
              sc.added_filtration, sc.phantom_thickness_cm,
              cf.figure, cf.value, cf.ci_low, cf.ci_high
         FROM studies s
         JOIN study_conditions sc ON sc.study_id = s.id
         JOIN condition_analyses ca ON ca.condition_id = sc.id AND ca.status = 'done'
         JOIN condition_figures cf ON cf.analysis_id = ca.id AND cf.figure IN (:figures)
         JOIN grids g ON g.id = sc.grid_id
        WHERE s.status = 'signed' AND s.room_id = :roomId
        ORDER BY s.signed_at, s.id, sc.position`,
      {
        type: QueryTypes.SELECT,
        replacements: { roomId, figures: [...figures] },
      },
    ),
    activeBaselinesOf([roomId], db),
  ]);
  const byMatch = baselinesByMatch(baselines);
  const dtos = await describe(baselines.map((b) => b.id));
  const groups = new Map<string, GroupBuild>();
  const groupOf = (row: TrendRow): GroupBuild => {
    const match = {
      roomId,
      gridId: row.grid_id,
      kvp: row.kvp,
      phantomThicknessCm: row.phantom_thickness_cm,
      addedFiltration: row.added_filtration ?? [],
    };
    const key = conditionMatchKey(match);
    let build = groups.get(key);
    if (!build) {
      const baseline = byMatch.get(key) ?? null;
      const filtration = describeFiltration(match.addedFiltration);
      build = {
        baseline,
        series: new Map(),
        group: {
          key,
          label: `${row.grid_label} · ${row.kvp} kV (${filtration}) · ${row.phantom_thickness_cm} cm`,
          grid: { id: row.grid_id, label: row.grid_label },
          kvp: row.kvp,
          filtration,
          phantomThicknessCm: row.phantom_thickness_cm,
          baseline: baseline ? (dtos.get(baseline.id) ?? null) : null,
          series: [],
        },
      };
      groups.set(key, build);
    }
    return build;
  };
  for (const row of rows) {
    const build = groupOf(row);
    let series = build.series.get(row.figure);
    if (!series) {
      series = seriesFor(row.figure, build.baseline);
      build.series.set(row.figure, series);
    }
    const b = build.baseline;
    const reference = b?.figures[row.figure];
    const isLater =
      b !== null &&
      b.sourceConditionId !== row.condition_id &&
      (!b.sourceSignedAt ||
        new Date(row.signed_at) >= new Date(b.sourceSignedAt));
    series.points.push({
      studyId: row.study_id,
      studyTitle: row.study_title,
      conditionId: row.condition_id,
      date: new Date(row.signed_at).toISOString(),
      value: row.value,
      ciLow: row.ci_low,
      ciHigh: row.ci_high,
      flag:
        isLater && reference
          ? toleranceFlag(
              row.figure,
              row.value,
              reference.value,
              b.tolerances[row.figure] ?? DEFAULT_TOLERANCE_PERCENT,
            )
          : null,
    });
  }
  const ordered = [...groups.values()]
    .map(({ group, series }) => ({
      ...group,
      series: figures
        .map((f) => series.get(f))
        .filter((s): s is TrendSeriesDto => s !== undefined),
    }))
    .sort(
      (a, b) =>
        Number(b.baseline !== null) - Number(a.baseline !== null) ||
        a.grid.label.localeCompare(b.grid.label) ||
        a.phantomThicknessCm - b.phantomThicknessCm ||
        a.kvp - b.kvp,
    );
  return { room, groups: ordered, policyNote: TOLERANCE_POLICY_NOTE };
}

interface LatestRow {
  room_id: number;
  room_name: string;
  site: string;
  signed_studies: number;
  study_id: number | null;
  study_title: string | null;
  signed_at: Date | null;
  revision: number | null;
}

/**
 * The latest signed study of every room, with its verdict counts and how
 * many of its conditions lie outside their baselines' tolerances.
 */
export async function roomSummaries(
  db: Sequelize = sequelize,
): Promise<{ rooms: RoomSummaryDto[]; cautions: string[] }> {
  const rows = await db.query<LatestRow>(
    `SELECT r.id AS room_id, r.name AS room_name, r.site,
            (SELECT count(*)::int FROM studies c
              WHERE c.room_id = r.id AND c.status = 'signed') AS signed_studies,
            latest.id AS study_id, latest.title AS study_title,
            latest.signed_at, latest.revision
       FROM rooms r
       LEFT JOIN LATERAL (
         SELECT s.id, s.title, s.signed_at, s.revision FROM studies s
          WHERE s.room_id = r.id AND s.status = 'signed'
          ORDER BY s.signed_at DESC, s.id DESC LIMIT 1
       ) latest ON true
      ORDER BY r.name`,
    { type: QueryTypes.SELECT },
  );
  const baselines = await activeBaselinesOf(
    rows.map((r) => r.room_id),
    db,
  );
  const byMatch = baselinesByMatch(baselines);
  const summaries = await Promise.all(
    rows.map(async (row): Promise<RoomSummaryDto> => {
      const activeBaselines = baselines.filter(
        (b) => b.roomId === row.room_id,
      ).length;
      const room = { id: row.room_id, name: row.room_name, site: row.site };
      if (row.study_id === null) {
        return {
          room,
          status: 'no-signed-study',
          latestStudy: null,
          signedStudies: row.signed_studies,
          activeBaselines,
          conditionsChecked: 0,
          conditionsOutside: 0,
          verdicts: null,
        };
      }
      const board = await queryCompareBoard(
        { studyId: row.study_id },
        ['signed'],
        1000,
        db,
      );
      let checked = 0;
      let outside = 0;
      const counts: VerdictCounts = {
        benefit: 0,
        noMeasurableBenefit: 0,
        cost: 0,
        none: 0,
      };
      for (const condition of board.conditions) {
        const check = checkAgainstBaseline(condition, byMatch);
        if (check) {
          checked += 1;
          if (check.outside > 0) outside += 1;
        }
        const sif = condition.figures.snr_improvement_factor;
        const outcome = sif ? verdictOutcome(sif) : null;
        if (outcome === 'benefit') counts.benefit += 1;
        else if (outcome === 'cost') counts.cost += 1;
        else if (outcome === 'no-measurable-benefit')
          counts.noMeasurableBenefit += 1;
        else counts.none += 1;
      }
      const status: RoomStatus =
        checked === 0
          ? 'no-baseline'
          : outside > 0
            ? 'outside-tolerance'
            : 'within-tolerance';
      return {
        room,
        status,
        latestStudy: {
          id: row.study_id,
          title: row.study_title ?? '',
          signedAt: new Date(row.signed_at!).toISOString(),
          revision: row.revision ?? 1,
        },
        signedStudies: row.signed_studies,
        activeBaselines,
        conditionsChecked: checked,
        conditionsOutside: outside,
        verdicts: { ...counts, sentence: summariseVerdicts(counts) },
      };
    }),
  );
  return { rooms: summaries, cautions: [...SAFETY_CAUTIONS] };
}
