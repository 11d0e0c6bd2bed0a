import type { Estimate } from '../../shared/analysis/estimate.ts';
import type { Actor } from '../../shared/permissions.ts';
import {
  figureDefinition,
  FIGURE_KEYS,
  flattenConditionFigures,
  type FigureKey,
} from '../../shared/figures.ts';
import type {
  AnalysisSettings,
  ConditionResultDto,
  FigureDto,
  ResultsProgressDto,
  ResultStatus,
  StudyResultsDto,
} from '../../shared/schemas/results.schema.ts';
import { describeCondition } from '../../shared/studies/condition-label.ts';
import { isOpenForChanges } from '../../shared/studies/study-state.ts';
import type { ConditionAnalysis } from '../models/condition-analysis.model.ts';
import type { ConditionFigure } from '../models/condition-figure.model.ts';
import type { Grid } from '../models/grid.model.ts';
import type { RegionLayoutRecord } from '../models/region-layout.model.ts';
import type { Study } from '../models/study.model.ts';
import { canEditStudy } from '../policies/study.policy.ts';
import type { ConditionImageSet } from '../services/image-pairing.service.ts';
import type {
  StoredAnalysisOptions,
  StoredAnalysisResult,
} from '../services/study-results.service.ts';

type AnalysisRow = ConditionAnalysis & { figures?: ConditionFigure[] };

const figureOrder = (key: FigureKey): number => FIGURE_KEYS.indexOf(key);

function figureFromRow(row: ConditionFigure): FigureDto {
  const d = figureDefinition(row.figure);
  return {
    key: row.figure,
    label: d.label,
    symbol: d.symbol,
    unit: d.unit,
    value: row.value,
    standardError: row.standardError,
    ciLow: row.ciLow,
    ciHigh: row.ciHigh,
    degreesOfFreedom: row.degreesOfFreedom,
    n: row.n,
    basis: row.basis,
  };
}

function figureFromEstimate(key: FigureKey, e: Estimate): FigureDto {
  const d = figureDefinition(key);
  return {
    key,
    label: d.label,
    symbol: d.symbol,
    unit: d.unit,
    value: e.value,
    standardError: e.standardError,
    ciLow: e.ci95.low,
    ciHigh: e.ci95.high,
    degreesOfFreedom: e.degreesOfFreedom,
    n: e.n,
    basis: e.basis,
  };
}

function statusOf(row: AnalysisRow | undefined): ResultStatus {
  return row ? row.status : 'not_computed';
}

/** Counts of the conditions by status. */
export function presentProgress(
  conditionIds: readonly number[],
  analyses: ReadonlyMap<number, Pick<ConditionAnalysis, 'status'>>,
): ResultsProgressDto {
  const progress = {
    total: conditionIds.length,
    notComputed: 0,
    queued: 0,
    running: 0,
    done: 0,
    failed: 0,
  };
  for (const id of conditionIds) {
    const status = analyses.get(id)?.status;
    if (status === undefined) progress.notComputed += 1;
    else progress[status] += 1;
  }
  return { ...progress, isComputing: progress.queued + progress.running > 0 };
}

function presentCondition(
  set: ConditionImageSet,
  study: Study,
  grids: readonly Grid[],
  row: AnalysisRow | undefined,
): ConditionResultDto {
  const c = set.condition;
  const grid = grids.find((g) => g.id === c.gridId) ?? null;
  const stored = (row?.result ?? null) as StoredAnalysisResult | null;
  const options = (row?.options ?? {}) as Partial<StoredAnalysisOptions>;
  const analysis =
    row?.status === 'done' ||
    row?.status === 'queued' ||
    row?.status === 'running'
      ? (stored?.analysis ?? null)
      : null;
  const primary =
    analysis?.objects.find((o) => o.name === stored?.primaryObject) ?? null;
  const objects = analysis
    ? [...analysis.objects]
        .sort((a, b) => (a === primary ? -1 : b === primary ? 1 : 0))
        .map((o) => ({
          name: o.name,
          backgrounds: o.backgrounds,
          figures: flattenConditionFigures(o.figures).map(({ key, estimate }) =>
            figureFromEstimate(key, estimate),
          ),
          verdict: o.figures.verdict
            ? {
                outcome: o.figures.verdict.outcome,
                sentence: o.figures.verdict.sentence,
              }
            : null,
        }))
    : [];
  const settings = options.settings as AnalysisSettings | undefined;
  return {
    conditionId: c.id,
    position: c.position,
    label: describeCondition(
      c,
      study.plan.phantom.material,
      grid?.label ?? 'grid',
    ),
    kvp: c.kvp,
    phantomThicknessCm: c.phantomThicknessCm,
    gridId: c.gridId,
    gridLabel: grid?.label ?? null,
    imageCounts: { grid: set.grid.length, noGrid: set.noGrid.length },
    status: statusOf(row),
    computedAt: row?.computedAt?.toISOString() ?? null,
    error:
      row?.status === 'failed' && row.errorCode
        ? { code: row.errorCode, message: row.errorMessage ?? '' }
        : null,
    primaryObject: primary?.name ?? null,
    figures: (row?.figures ?? [])
      .map(figureFromRow)
      .sort((a, b) => figureOrder(a.key) - figureOrder(b.key)),
    verdict:
      row?.verdictOutcome && row.verdictSentence
        ? { outcome: row.verdictOutcome, sentence: row.verdictSentence }
        : null,
    objects,
    method:
      analysis && primary && settings
        ? {
            signal: analysis.method.signal,
            cnr: analysis.method.cnr,
            cnrDefinition: analysis.method.cnrDefinition,
            detrend: analysis.method.detrend,
            noise: analysis.method.noise,
            doseMeasure: analysis.method.doseMeasure,
            doseLabel: analysis.method.doseLabel,
            uncertainty: analysis.method.uncertainty,
            transmissions: primary.figures.method.transmissions,
            snrImprovementFactor: primary.figures.method.snrImprovementFactor,
            calibration: options.calibration
              ? {
                  id: options.calibration.id,
                  calibratedOn: options.calibration.calibratedOn,
                  model: options.calibration.model,
                  rSquared: options.calibration.rSquared,
                }
              : null,
            statedScatterTransmission:
              options.statedScatterTransmission ?? null,
            layoutName: options.layout?.name ?? '',
          }
        : null,
    warnings: row?.warnings ?? [],
  };
}

/**
 * Everything the results page shows: per condition (checklist order) its
 * status, the primary object's figures from `condition_figures` with 95 %
 * intervals, every object's figures, the verdict, the method and the
 * warnings; the progress of a recomputation; whether the viewer may ask
 * for one.
 */
export function presentStudyResults(input: {
  study: Study;
  viewer: Actor;
  sets: readonly ConditionImageSet[];
  grids: readonly Grid[];
  analyses: ReadonlyMap<number, AnalysisRow>;
  layout: RegionLayoutRecord | null;
  settings: AnalysisSettings;
}): StudyResultsDto {
  const { study, viewer, sets, grids, analyses } = input;
  return {
    studyId: study.id,
    studyStatus: study.status,
    settings: input.settings,
    layout: input.layout
      ? { id: input.layout.id, name: input.layout.name }
      : null,
    progress: presentProgress(
      sets.map((s) => s.condition.id),
      analyses,
    ),
    conditions: sets.map((s) =>
      presentCondition(s, study, grids, analyses.get(s.condition.id)),
    ),
    permissions: {
      recompute: isOpenForChanges(study.status) && canEditStudy(viewer, study),
    },
  };
}
