import { z } from 'zod';
import type { UncertaintyBasis } from '../analysis/estimate.ts';
import type { GridVerdictOutcome } from '../analysis/verdict.ts';
import type { FigureKey } from '../figures.ts';
import type { Warning } from '../warnings.ts';

/**
 * Shapes of the study results API: the analysis settings of a study, the
 * figures of every condition with their 95 % intervals and method, and the
 * progress of a recomputation.
 */

/** The choices a study's analysis is run with (defaults as `lamella analyze`). */
export const analysisSettingsSchema = z.object({
  cnrDefinition: z
    .enum(['background-sd', 'pooled-sd'])
    .default('background-sd'),
  detrend: z.enum(['none', 'plane']).default('none'),
  noise: z.enum(['region', 'replicate-difference']).default('region'),
  doseMeasure: z.enum(['mas', 'dap', 'entrance']).default('mas'),
});
export type AnalysisSettings = z.infer<typeof analysisSettingsSchema>;

/** `POST /api/studies/:id/results/recompute`: new settings, or none to keep them. */
export const recomputeRequestSchema = z.object({
  settings: analysisSettingsSchema.optional(),
});
export type RecomputeRequest = z.infer<typeof recomputeRequestSchema>;

/** What a condition's analysis is doing; `not_computed` before any run. */
export const RESULT_STATUSES = [
  'not_computed',
  'queued',
  'running',
  'done',
  'failed',
] as const;
export type ResultStatus = (typeof RESULT_STATUSES)[number];

/** One figure with its 95 % interval, as stored in `condition_figures`. */
export interface FigureDto {
  key: FigureKey;
  label: string;
  symbol: string;
  unit: string;
  value: number;
  standardError: number;
  ciLow: number;
  ciHigh: number;
  /** Null for a large-sample (normal) interval. */
  degreesOfFreedom: number | null;
  /** Images behind the figure (the smaller side of a ratio). */
  n: number;
  basis: UncertaintyBasis;
}

export interface VerdictDto {
  outcome: GridVerdictOutcome;
  sentence: string;
}

/** Every figure of one object of the layout in one condition. */
export interface ObjectResultDto {
  name: string;
  backgrounds: string[];
  figures: FigureDto[];
  verdict: VerdictDto | null;
}

/** How a condition was analysed. */
export interface ResultMethodDto {
  /** How stored values became signal, per distinct description. */
  signal: string[];
  cnr: string;
  cnrDefinition: AnalysisSettings['cnrDefinition'];
  detrend: AnalysisSettings['detrend'];
  noise: AnalysisSettings['noise'];
  doseMeasure: AnalysisSettings['doseMeasure'];
  doseLabel: string;
  uncertainty: string;
  transmissions: string;
  snrImprovementFactor: string;
  calibration: {
    id: number;
    calibratedOn: string;
    model: string;
    rSquared: number;
  } | null;
  statedScatterTransmission: number | null;
  layoutName: string;
}

/** The results of one study condition. */
export interface ConditionResultDto {
  conditionId: number;
  position: number;
  label: string;
  kvp: number;
  phantomThicknessCm: number;
  gridId: number;
  gridLabel: string | null;
  imageCounts: { grid: number; noGrid: number };
  status: ResultStatus;
  computedAt: string | null;
  error: { code: string; message: string } | null;
  /** The object whose figures are stored per condition (the layout's first). */
  primaryObject: string | null;
  /** The primary object's figures, from `condition_figures`. */
  figures: FigureDto[];
  verdict: VerdictDto | null;
  /** Every object of the layout, the primary one first. */
  objects: ObjectResultDto[];
  method: ResultMethodDto | null;
  /** Trust warnings of the images and warnings of the analysis. */
  warnings: Warning[];
}

/** How far a recomputation has come. */
export interface ResultsProgressDto {
  total: number;
  notComputed: number;
  queued: number;
  running: number;
  done: number;
  failed: number;
  /** True while any condition is queued or running. */
  isComputing: boolean;
}

/** `GET /api/studies/:id/results`. */
export interface StudyResultsDto {
  studyId: number;
  studyStatus: string;
  settings: AnalysisSettings;
  layout: { id: number; name: string } | null;
  progress: ResultsProgressDto;
  conditions: ConditionResultDto[];
  permissions: { recompute: boolean };
}
