import { z } from 'zod';
import type { GridVerdictOutcome } from '../analysis/verdict.ts';
import type { BaselineCheck } from '../compare/baseline-check.ts';
import type { FieldVsStatedRow } from '../compare/field-vs-stated.ts';
import type { ToleranceFlag } from '../compare/tolerance.ts';
import type { FigureKey } from '../figures.ts';
import { FIGURE_KEYS } from '../figures.ts';
import type { Role } from '../permissions.ts';
import type {
  FilterLayer,
  PhantomMaterial,
  StudyStatus,
} from './study.schema.ts';
import type { Warning } from '../warnings.ts';

/**
 * The comparison board, baselines, trends and room summary: query schemas
 * and the shapes the API sends (dates are ISO 8601 strings).
 */

/** Conditions listed on the board at most (aggregates cover all matches). */
export const MAX_BOARD_CONDITIONS = 1000;
export const DEFAULT_BOARD_CONDITIONS = 200;

const idList = z.preprocess((value) => {
  if (value === undefined || value === '') return undefined;
  const parts = (Array.isArray(value) ? value : [value]).flatMap((v) =>
    String(v).split(','),
  );
  return parts.filter((p) => p.trim() !== '').map((p) => Number(p));
}, z.array(z.number().int().positive()).max(100).optional());

const optionalNumber = (min: number, max: number) =>
  z.preprocess(
    (value) => (value === undefined || value === '' ? undefined : value),
    z.coerce.number().min(min).max(max).optional(),
  );

const optionalDate = z.preprocess(
  (value) => (value === undefined || value === '' ? undefined : value),
  z
    .string()
    .regex(/^\d{4}-\d{2}-\d{2}$/, 'Give a date as YYYY-MM-DD.')
    .optional(),
);

const flag = z
  .enum(['true', 'false'])
  .transform((v) => v === 'true')
  .optional();

/** Filters of the board (query string of /api/compare, .csv, .pdf). */
export const compareQuerySchema = z
  .object({
    rooms: idList,
    grids: idList,
    detectors: idList,
    // common practice: radiographic generators span 40–150 kV.
    kvMin: optionalNumber(0, 200),
    kvMax: optionalNumber(0, 200),
    thicknessMin: optionalNumber(0, 100),
    thicknessMax: optionalNumber(0, 100),
    /** Study date from/to, inclusive (signed date, or created date of a draft). */
    from: optionalDate,
    to: optionalDate,
    /** Also unsigned studies; physicists only. */
    drafts: flag,
    limit: z.coerce
      .number()
      .int()
      .min(1)
      .max(MAX_BOARD_CONDITIONS)
      .default(DEFAULT_BOARD_CONDITIONS),
  })
  .refine(
    (q) => q.kvMin === undefined || q.kvMax === undefined || q.kvMin <= q.kvMax,
    { message: 'The lowest kV is above the highest.', path: ['kvMin'] },
  )
  .refine(
    (q) =>
      q.thicknessMin === undefined ||
      q.thicknessMax === undefined ||
      q.thicknessMin <= q.thicknessMax,
    {
      message: 'The thinnest phantom is above the thickest.',
      path: ['thicknessMin'],
    },
  )
  .refine((q) => !q.from || !q.to || q.from <= q.to, {
    message: 'The first date is after the last.',
    path: ['from'],
  });
export type CompareQuery = z.infer<typeof compareQuerySchema>;
export type CompareQueryInput = z.input<typeof compareQuerySchema>;

const tolerancePercent = z
  .number({ error: 'Give the tolerance in % as a number.' })
  .gt(0, 'A tolerance is above 0 %.')
  .max(100, 'A tolerance is at most 100 %.');

export const tolerancesSchema = z.partialRecord(
  z.enum(FIGURE_KEYS),
  tolerancePercent,
);

/** Marks a signed study's condition as the baseline of its room + grid. */
export const createBaselineSchema = z.object({
  conditionId: z.number().int().positive(),
  /** Figures to keep; all the condition has when left out. */
  figures: z
    .array(z.enum(FIGURE_KEYS))
    .min(1)
    .max(FIGURE_KEYS.length)
    .optional(),
  /** % per figure; ±10 % for any figure not named. */
  tolerances: tolerancesSchema.default({}),
  note: z.string().trim().max(2000).default(''),
});
export type CreateBaselineInput = z.infer<typeof createBaselineSchema>;

export const updateBaselineSchema = z
  .object({
    tolerances: tolerancesSchema.optional(),
    note: z.string().trim().max(2000).optional(),
    /** false retires the baseline; flags stop using it. */
    active: z.literal(false).optional(),
  })
  .refine((v) => Object.keys(v).length > 0, 'Nothing to change.');
export type UpdateBaselineInput = z.infer<typeof updateBaselineSchema>;

export const listBaselinesQuerySchema = z.object({
  roomId: z.coerce.number().int().positive().optional(),
  gridId: z.coerce.number().int().positive().optional(),
  active: flag,
});

export const baselineIdParamsSchema = z.object({
  id: z.coerce.number().int().positive(),
});

export const roomIdParamsSchema = baselineIdParamsSchema;

export const trendQuerySchema = z.object({
  figures: z.preprocess(
    (value) =>
      value === undefined || value === ''
        ? undefined
        : (Array.isArray(value) ? value : [value]).flatMap((v) =>
            String(v).split(','),
          ),
    z.array(z.enum(FIGURE_KEYS)).min(1).max(FIGURE_KEYS.length).optional(),
  ),
});

/** One figure's value with its interval. */
export interface FigureValueDto {
  value: number;
  standardError: number;
  ciLow: number;
  ciHigh: number;
  degreesOfFreedom: number | null;
  n: number;
  basis: string;
}

export interface CompareStudyRefDto {
  id: number;
  title: string;
  status: StudyStatus;
  revision: number;
  signedAt: string | null;
  signedBy: string | null;
  /** Signed date, or created date while unsigned. */
  date: string;
}

/** How a condition's figures were computed (from the stored analysis). */
export interface CompareMethodDto {
  cnrDefinition: string | null;
  cnr: string | null;
  doseMeasure: string | null;
  doseLabel: string | null;
  signal: string[];
  uncertainty: string | null;
}

export type BaselineCheckDto = BaselineCheck;

/** One condition of the board. */
export interface CompareConditionDto {
  conditionId: number;
  analysisId: number;
  study: CompareStudyRefDto;
  room: { id: number; name: string };
  detector: { id: number; name: string } | null;
  grid: { id: number; label: string; ratio: number | null };
  kvp: number;
  addedFiltration: FilterLayer[];
  filtration: string;
  hvlMmAl: number | null;
  phantomThicknessCm: number;
  phantomMaterial: PhantomMaterial | null;
  label: string;
  figures: Partial<Record<FigureKey, FigureValueDto>>;
  verdict: { outcome: GridVerdictOutcome | null; sentence: string };
  cautions: string[];
  warnings: Warning[];
  method: CompareMethodDto | null;
  baseline: BaselineCheckDto | null;
  predicted: PredictedForConditionDto | null;
}

/** Predicted figures beside the measured ones of one condition. */
export interface PredictedForConditionDto {
  primaryTransmission: number;
  scatterTransmission: number;
  selectivity: number;
  /** With the condition's measured SPR, when there is one. */
  withMeasuredSpr: {
    scatterToPrimaryRatio: number;
    totalTransmission: number;
    contrastImprovementFactor: number;
    buckyFactor: number;
    snrImprovementFactor: number;
  } | null;
  assumptions: string;
}

/** One point of a chart: a group's aggregate at one x. */
export interface ChartPointDto {
  x: number;
  /** Inverse-variance weighted mean (the condition's value when n = 1). */
  y: number;
  /** 95 % interval: the condition's own when n = 1, else y ± 1.96·SE. */
  low: number;
  high: number;
  n: number;
  /** Plain mean and between-condition sample SD (null when n = 1). */
  mean: number;
  sampleSd: number | null;
}

export interface ChartGroupDto {
  key: string;
  label: string;
  points: ChartPointDto[];
}

export type ChartId =
  | 'sif-vs-kv'
  | 'cif-vs-kv'
  | 'sif-vs-thickness'
  | 'cif-vs-thickness'
  | 'bucky-vs-ratio';

export interface ChartDto {
  id: ChartId;
  title: string;
  figure: FigureKey;
  xLabel: string;
  yLabel: string;
  /** y of "no change" (1 for the factors), drawn as a reference line. */
  reference: number | null;
  groups: ChartGroupDto[];
}

/** Field values of a grid over the selection beside its stated figures. */
export interface GridComparisonDto {
  grid: {
    id: number;
    label: string;
    ratio: number | null;
    stripFrequencyPerCm: number | null;
    focusDistanceCm: number | null;
    statedFiguresNote: string | null;
  };
  fieldVsStated: FieldVsStatedRow[];
}

export interface VerdictSummaryDto {
  benefit: number;
  noMeasurableBenefit: number;
  cost: number;
  none: number;
  sentence: string;
}

export interface CompareBoardDto {
  query: CompareQuery;
  scope: 'signed' | 'signed-and-unsigned';
  /** Conditions matching the filters (the list shows at most `limit`). */
  total: number;
  truncated: boolean;
  conditions: CompareConditionDto[];
  charts: ChartDto[];
  grids: GridComparisonDto[];
  verdicts: VerdictSummaryDto;
  notes: { fieldVsStated: string; tolerance: string; aggregation: string };
  cautions: string[];
  permissions: { includeDrafts: boolean; setBaseline: boolean };
}

export interface CompareOptionsDto {
  rooms: Array<{ id: number; name: string; site: string }>;
  grids: Array<{ id: number; label: string; ratio: number | null }>;
  detectors: Array<{ id: number; name: string; roomId: number }>;
  permissions: { includeDrafts: boolean; setBaseline: boolean };
}

export interface BaselineFigureDto {
  value: number;
  ciLow: number;
  ciHigh: number;
  standardError: number;
  n: number;
}

export interface BaselineDto {
  id: number;
  room: { id: number; name: string };
  grid: { id: number; label: string };
  kvp: number;
  addedFiltration: FilterLayer[];
  filtration: string;
  phantomThicknessCm: number;
  source: {
    studyId: number;
    studyTitle: string;
    revision: number;
    conditionId: number | null;
    analysisId: number | null;
  };
  figures: Partial<Record<FigureKey, BaselineFigureDto>>;
  tolerances: Partial<Record<FigureKey, number>>;
  note: string;
  policyNote: string;
  setBy: { id: number; displayName: string; role: Role };
  setAt: string;
  active: boolean;
  retiredAt: string | null;
  permissions: { edit: boolean; delete: boolean };
}

/** One study's value of one figure in a trend. */
export interface TrendPointDto {
  studyId: number;
  studyTitle: string;
  conditionId: number;
  date: string;
  value: number;
  ciLow: number;
  ciHigh: number;
  flag: ToleranceFlag | null;
}

export interface TrendSeriesDto {
  figure: FigureKey;
  label: string;
  symbol: string;
  unit: string;
  /** Baseline value and band, when this group has an active baseline. */
  band: {
    baselineValue: number;
    low: number;
    high: number;
    tolerancePercent: number;
  } | null;
  points: TrendPointDto[];
}

/** One room + grid + beam + phantom combination followed over time. */
export interface TrendGroupDto {
  key: string;
  label: string;
  grid: { id: number; label: string };
  kvp: number;
  filtration: string;
  phantomThicknessCm: number;
  baseline: BaselineDto | null;
  series: TrendSeriesDto[];
}

export interface RoomTrendDto {
  room: { id: number; name: string; site: string };
  groups: TrendGroupDto[];
  policyNote: string;
}

export type RoomStatus =
  'no-signed-study' | 'no-baseline' | 'within-tolerance' | 'outside-tolerance';

export interface RoomSummaryDto {
  room: { id: number; name: string; site: string };
  status: RoomStatus;
  latestStudy: {
    id: number;
    title: string;
    signedAt: string;
    revision: number;
  } | null;
  signedStudies: number;
  activeBaselines: number;
  /** Conditions of the latest study checked against a baseline, and those with a flag. */
  conditionsChecked: number;
  conditionsOutside: number;
  verdicts: VerdictSummaryDto | null;
}
