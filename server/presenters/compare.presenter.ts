import { SAFETY_CAUTIONS } from '../../shared/cautions.ts';
import {
  FIELD_VS_STATED_NOTE,
  fieldVersusStated,
  type FieldValue,
} from '../../shared/compare/field-vs-stated.ts';
import {
  baselinesByMatch,
  checkAgainstBaseline,
} from '../../shared/compare/baseline-check.ts';
import {
  TOLERANCE_POLICY_NOTE,
  filtrationKey,
} from '../../shared/compare/tolerance.ts';
import {
  conditionVerdict,
  summariseVerdicts,
  verdictCautions,
  type VerdictCounts,
} from '../../shared/compare/verdict-wording.ts';
import type { FigureKey } from '../../shared/figures.ts';
import { figureDefinition } from '../../shared/figures.ts';
import type { Actor } from '../../shared/permissions.ts';
import type {
  BaselineDto,
  ChartDto,
  ChartGroupDto,
  ChartId,
  CompareBoardDto,
  CompareConditionDto,
  CompareOptionsDto,
  CompareQuery,
  GridComparisonDto,
  PredictedForConditionDto,
  VerdictSummaryDto,
} from '../../shared/schemas/compare.schema.ts';
import type { StudyStatus } from '../../shared/schemas/study.schema.ts';
import { describeFiltration } from '../../shared/studies/expected-acquisitions.ts';
import { describeCondition } from '../../shared/studies/condition-label.ts';
import {
  canIncludeUnsignedStudies,
  canManageBaselines,
} from '../policies/compare.policy.ts';
import type {
  ActiveBaseline,
  DescribedBaseline,
} from '../services/baseline.service.ts';
import type {
  BoardAggregate,
  BoardConditionRow,
  BoardData,
  BoardGrid,
  LoadedBoard,
} from '../services/compare-board.service.ts';

/** How chart points pool conditions; printed under the charts. */
export const AGGREGATION_NOTE =
  'Each chart point pools the matching conditions of its group: the inverse-variance weighted mean with a 95 % interval of ±1.96 standard errors (fixed-effect pooling); a point from one condition shows that condition’s own interval. Narrow kV and thickness to compare like with like.';

/** The board's note beside stated figures (PHYSICS.md §2). */
export const BOARD_FIELD_NOTE = `${FIELD_VS_STATED_NOTE} The standard’s reference conditions (about 100 kV and 20 cm of water; quoted from memory) are closest when the board is filtered to them.`;

const iso = (date: Date | null): string | null =>
  date ? new Date(date).toISOString() : null;

/** One condition of the board as sent. */
export function presentCondition(
  row: BoardConditionRow,
  baselines: ReadonlyMap<string, ActiveBaseline>,
  predicted: PredictedForConditionDto | null,
): CompareConditionDto {
  const sif = row.figures.snr_improvement_factor ?? null;
  return {
    conditionId: row.conditionId,
    analysisId: row.analysisId,
    study: {
      id: row.studyId,
      title: row.studyTitle,
      status: row.studyStatus,
      revision: row.revision,
      signedAt: iso(row.signedAt),
      signedBy: row.signedBy,
      date: iso(row.studyDate)!,
    },
    room: { id: row.roomId, name: row.roomName },
    detector:
      row.detectorId === null
        ? null
        : { id: row.detectorId, name: row.detectorName ?? '' },
    grid: { id: row.gridId, label: row.gridLabel, ratio: row.gridRatio },
    kvp: row.kvp,
    addedFiltration: row.addedFiltration,
    filtration: describeFiltration(row.addedFiltration),
    hvlMmAl: row.hvlMmAl,
    phantomThicknessCm: row.phantomThicknessCm,
    phantomMaterial: row.phantomMaterial,
    label: describeCondition(row, row.phantomMaterial ?? 'pmma', row.gridLabel),
    figures: row.figures,
    verdict: conditionVerdict(sif),
    cautions: verdictCautions(row.phantomThicknessCm),
    warnings: row.warnings,
    method: row.method,
    baseline: checkAgainstBaseline(row, baselines),
    predicted,
  };
}

interface ChartSpec {
  id: ChartId;
  figure: FigureKey;
  grouping: BoardAggregate['grouping'];
  xLabel: string;
}

const CHARTS: ChartSpec[] = [
  {
    id: 'sif-vs-kv',
    figure: 'snr_improvement_factor',
    grouping: 'grid-thickness-kv',
    xLabel: 'Tube voltage (kV)',
  },
  {
    id: 'cif-vs-kv',
    figure: 'contrast_improvement_factor',
    grouping: 'grid-thickness-kv',
    xLabel: 'Tube voltage (kV)',
  },
  {
    id: 'sif-vs-thickness',
    figure: 'snr_improvement_factor',
    grouping: 'room-thickness',
    xLabel: 'Phantom thickness (cm)',
  },
  {
    id: 'cif-vs-thickness',
    figure: 'contrast_improvement_factor',
    grouping: 'room-thickness',
    xLabel: 'Phantom thickness (cm)',
  },
  {
    id: 'bucky-vs-ratio',
    figure: 'bucky_factor',
    grouping: 'grid',
    xLabel: 'Grid ratio',
  },
];

function chartTitle(spec: ChartSpec): string {
  const d = figureDefinition(spec.figure);
  const per =
    spec.grouping === 'grid-thickness-kv'
      ? 'against kV, per grid and phantom thickness'
      : spec.grouping === 'room-thickness'
        ? 'against phantom thickness, per room'
        : 'against grid ratio, per grid';
  return `${d.label} (${d.symbol}) ${per}`;
}

/**
 * The board's charts from its aggregates: SIF and CIF against kV per grid
 * and thickness, against thickness per room, and the Bucky factor against
 * grid ratio.
 */
export function boardCharts(data: BoardData): ChartDto[] {
  return CHARTS.map((spec) => {
    const groups = new Map<string, ChartGroupDto>();
    for (const a of data.aggregates) {
      if (a.grouping !== spec.grouping || a.figure !== spec.figure) continue;
      const grid = a.gridId === null ? undefined : data.grids.get(a.gridId);
      let key: string;
      let label: string;
      let x: number | null;
      if (spec.grouping === 'grid-thickness-kv') {
        key = `g${a.gridId}-t${a.phantomThicknessCm}`;
        label = `${grid?.label ?? `grid ${a.gridId}`} · ${a.phantomThicknessCm} cm`;
        x = a.kvp;
      } else if (spec.grouping === 'room-thickness') {
        key = `r${a.roomId}`;
        label = data.rooms.get(a.roomId!) ?? `room ${a.roomId}`;
        x = a.phantomThicknessCm;
      } else {
        key = `g${a.gridId}`;
        label = grid?.label ?? `grid ${a.gridId}`;
        x = grid?.ratio ?? null;
      }
      if (x === null) continue;
      const group = groups.get(key) ?? { key, label, points: [] };
      group.points.push({
        x,
        y: a.weightedMean,
        low: a.low,
        high: a.high,
        n: a.n,
        mean: a.mean,
        sampleSd: a.sampleSd,
      });
      groups.set(key, group);
    }
    const sorted = [...groups.values()]
      .map((g) => ({ ...g, points: g.points.sort((p, q) => p.x - q.x) }))
      .sort((a, b) => a.label.localeCompare(b.label));
    const d = figureDefinition(spec.figure);
    return {
      id: spec.id,
      title: chartTitle(spec),
      figure: spec.figure,
      xLabel: spec.xLabel,
      yLabel: `${d.symbol}`,
      reference: 1,
      groups: sorted,
    };
  });
}

/**
 * Charts of one study: SIF and CIF against kV, one series per grid and
 * phantom thickness, each point a condition with its own 95 % interval.
 */
export function studyCharts(
  conditions: readonly BoardConditionRow[],
): ChartDto[] {
  return CHARTS.filter((spec) => spec.grouping === 'grid-thickness-kv').map(
    (spec) => {
      const groups = new Map<string, ChartGroupDto>();
      for (const c of conditions) {
        const f = c.figures[spec.figure];
        if (!f) continue;
        const key = `g${c.gridId}-t${c.phantomThicknessCm}-f${filtrationKey(c.addedFiltration)}`;
        const filtration = describeFiltration(c.addedFiltration);
        const label = `${c.gridLabel} · ${c.phantomThicknessCm} cm${filtration === 'none' ? '' : ` · ${filtration}`}`;
        const group = groups.get(key) ?? { key, label, points: [] };
        group.points.push({
          x: c.kvp,
          y: f.value,
          low: f.ciLow,
          high: f.ciHigh,
          n: 1,
          mean: f.value,
          sampleSd: null,
        });
        groups.set(key, group);
      }
      const d = figureDefinition(spec.figure);
      return {
        id: spec.id,
        title: `${d.label} (${d.symbol}) against kV`,
        figure: spec.figure,
        xLabel: spec.xLabel,
        yLabel: d.symbol,
        reference: 1,
        groups: [...groups.values()].map((g) => ({
          ...g,
          points: g.points.sort((p, q) => p.x - q.x),
        })),
      };
    },
  );
}

/** Field values per grid over the selection beside its stated figures. */
export function gridComparisons(data: BoardData): GridComparisonDto[] {
  const field = new Map<number, Partial<Record<FigureKey, FieldValue>>>();
  for (const a of data.aggregates) {
    if (a.grouping !== 'grid' || a.gridId === null) continue;
    const values = field.get(a.gridId) ?? {};
    values[a.figure] = {
      value: a.weightedMean,
      ciLow: a.low,
      ciHigh: a.high,
      n: a.n,
    };
    field.set(a.gridId, values);
  }
  return [...field.keys()]
    .map((id) => data.grids.get(id))
    .filter((g): g is BoardGrid => g !== undefined)
    .sort((a, b) => a.label.localeCompare(b.label))
    .map((grid) => ({
      grid: {
        id: grid.id,
        label: grid.label,
        ratio: grid.ratio,
        stripFrequencyPerCm: grid.stripFrequencyPerCm,
        focusDistanceCm: grid.focusDistanceCm,
        statedFiguresNote: grid.statedFiguresNote,
      },
      fieldVsStated: fieldVersusStated(grid, field.get(grid.id) ?? {}),
    }));
}

/** Verdict counts over every matching condition, from the SIF aggregate. */
export function verdictSummary(data: BoardData): VerdictSummaryDto {
  const sif = data.aggregates.find(
    (a) => a.grouping === 'figure' && a.figure === 'snr_improvement_factor',
  );
  const withSif = sif?.n ?? 0;
  const counts: VerdictCounts = {
    benefit: sif?.aboveOne ?? 0,
    cost: sif?.belowOne ?? 0,
    noMeasurableBenefit: withSif - (sif?.aboveOne ?? 0) - (sif?.belowOne ?? 0),
    none: Math.max(0, data.total - withSif),
  };
  return { ...counts, sentence: summariseVerdicts(counts) };
}

/** Whether unsigned studies were in scope. */
export const scopeOf = (
  statuses: readonly StudyStatus[],
): CompareBoardDto['scope'] =>
  statuses.some((s) => s !== 'signed') ? 'signed-and-unsigned' : 'signed';

/** The listed conditions of a loaded board, as sent. */
export function presentBoardConditions(
  board: LoadedBoard,
): CompareConditionDto[] {
  const byMatch = baselinesByMatch(board.baselines);
  return board.data.conditions.map((row) =>
    presentCondition(
      row,
      byMatch,
      board.predictions.get(row.conditionId) ?? null,
    ),
  );
}

/** The whole board as sent to the viewer. */
export function presentCompareBoard(
  query: CompareQuery,
  statuses: readonly StudyStatus[],
  board: LoadedBoard,
  viewer: Actor,
): CompareBoardDto {
  const { data } = board;
  return {
    query,
    scope: scopeOf(statuses),
    total: data.total,
    truncated: data.total > data.conditions.length,
    conditions: presentBoardConditions(board),
    charts: boardCharts(data),
    grids: gridComparisons(data),
    verdicts: verdictSummary(data),
    notes: {
      fieldVsStated: BOARD_FIELD_NOTE,
      tolerance: TOLERANCE_POLICY_NOTE,
      aggregation: AGGREGATION_NOTE,
    },
    cautions: [...SAFETY_CAUTIONS],
    permissions: comparePermissions(viewer),
  };
}

/** What the viewer may do on the board. */
export const comparePermissions = (
  viewer: Actor,
): CompareOptionsDto['permissions'] => ({
  includeDrafts: canIncludeUnsignedStudies(viewer),
  setBaseline: canManageBaselines(viewer),
});

/** One baseline as sent. */
export function presentBaseline(
  described: DescribedBaseline,
  viewer: Actor,
): BaselineDto {
  const { baseline } = described;
  const canManage = canManageBaselines(viewer);
  return {
    id: baseline.id,
    room: { id: baseline.roomId, name: described.roomName },
    grid: { id: baseline.gridId, label: described.gridLabel },
    kvp: baseline.kvp,
    addedFiltration: baseline.addedFiltration,
    filtration: describeFiltration(baseline.addedFiltration),
    phantomThicknessCm: baseline.phantomThicknessCm,
    source: {
      studyId: baseline.sourceStudyId,
      studyTitle: described.studyTitle,
      revision: baseline.sourceRevision,
      conditionId: baseline.sourceConditionId,
      analysisId: baseline.sourceAnalysisId,
    },
    figures: baseline.figures,
    tolerances: baseline.tolerances,
    note: baseline.note,
    policyNote: TOLERANCE_POLICY_NOTE,
    setBy: described.setBy,
    setAt: baseline.setAt.toISOString(),
    active: baseline.active,
    retiredAt: iso(baseline.retiredAt),
    permissions: { edit: canManage && baseline.active, delete: canManage },
  };
}
