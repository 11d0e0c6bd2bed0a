import { Op, QueryTypes, type Transaction } from 'sequelize';
import type { CalibrationFit } from '../../shared/analysis/detector-calibration.ts';
import { DomainError } from '../../shared/errors.ts';
import { flattenConditionFigures } from '../../shared/figures.ts';
import {
  analysisSettingsSchema,
  type AnalysisSettings,
} from '../../shared/schemas/results.schema.ts';
import type { Warning } from '../../shared/warnings.ts';
import type { AnalysisImage } from '../analysis/analysis-image.ts';
import type { ConditionAnalysis as ConditionAnalysisResult } from '../analysis/condition-analysis.service.ts';
import { analyseCondition } from '../analysis/condition-analysis.service.ts';
import { sequelize } from '../db/sequelize.ts';
import type { Acquisition } from '../dicom/acquisition.ts';
import { decodeDicom } from '../dicom/decode-dicom.ts';
import { ConditionAnalysis } from '../models/condition-analysis.model.ts';
import { ConditionFigure } from '../models/condition-figure.model.ts';
import { DetectorCalibration } from '../models/detector-calibration.model.ts';
import { Grid } from '../models/grid.model.ts';
import { ImageRegion } from '../models/image-region.model.ts';
import { Image } from '../models/image.model.ts';
import type { RegionLayoutRecord } from '../models/region-layout.model.ts';
import { toRegionLayout } from '../models/region-layout.model.ts';
import type { StudyCondition } from '../models/study-condition.model.ts';
import { StudyAnalysisSettings } from '../models/study-analysis-settings.model.ts';
import { Study } from '../models/study.model.ts';
import { recordAudit, type AuditContext } from './audit.service.ts';
import {
  conditionImageSets,
  type ConditionImageSet,
} from './image-pairing.service.ts';
import type { ImageStore } from './image-storage.service.ts';
import { placedLayoutFor } from './image-region.service.ts';
import { findStudyLayout } from './region-layout.service.ts';
import { STUDY_AUDIT_TARGET } from './study.service.ts';
import { isOpenForChanges } from '../../shared/studies/study-state.ts';

/** What computing results needs from the outside world. */
export interface ResultsDeps {
  store: ImageStore;
}

/** A condition that cannot be analysed, with a code the results page explains. */
class ResultFailure extends Error {
  constructor(
    readonly code: string,
    message: string,
  ) {
    super(message);
  }
}

/** What a stored analysis row's `options` hold. */
export interface StoredAnalysisOptions {
  settings: AnalysisSettings;
  calibration: {
    id: number;
    detectorId: number;
    calibratedOn: string;
    model: string;
    rSquared: number;
  } | null;
  statedScatterTransmission: number | null;
  layout: { id: number; name: string } | null;
  images: {
    grid: Array<{ imageId: number; replicate: number }>;
    noGrid: Array<{ imageId: number; replicate: number }>;
  };
}

/** What a stored analysis row's `result` holds. */
export interface StoredAnalysisResult {
  /** The analysis engine's whole result (every object, image summaries, method). */
  analysis: ConditionAnalysisResult;
  /** The object whose figures are in `condition_figures` (the layout's first). */
  primaryObject: string;
}

/**
 * The study's analysis settings: those of its latest request, else the
 * defaults (those of `lamella analyze`).
 */
export async function studyAnalysisSettings(
  studyId: number,
  transaction?: Transaction,
): Promise<AnalysisSettings> {
  const row = await StudyAnalysisSettings.findByPk(studyId, { transaction });
  const parsed = analysisSettingsSchema.safeParse(row?.settings ?? {});
  return parsed.success ? parsed.data : analysisSettingsSchema.parse({});
}

/** The time of the study's latest request, as PostgreSQL text (full precision). */
async function latestRequest(studyId: number): Promise<string | null> {
  const rows = await sequelize.query<{ at: string }>(
    'SELECT requested_at::text AS at FROM study_analysis_settings WHERE study_id = :studyId',
    { replacements: { studyId }, type: QueryTypes.SELECT },
  );
  return rows[0]?.at ?? null;
}

/**
 * Whether a request newer than `startedFrom` arrived; locks the study's
 * settings row for the rest of the transaction, so a request cannot slip in
 * between this answer and the status written with it.
 */
async function overtaken(
  studyId: number,
  startedFrom: string | null,
  transaction: Transaction,
): Promise<boolean> {
  const rows = await sequelize.query<{ newer: boolean }>(
    `SELECT (:startedFrom::timestamptz IS NULL OR requested_at > :startedFrom::timestamptz) AS newer
       FROM study_analysis_settings WHERE study_id = :studyId FOR UPDATE`,
    {
      replacements: { studyId, startedFrom },
      type: QueryTypes.SELECT,
      transaction,
    },
  );
  return rows[0]?.newer ?? false;
}

/**
 * The calibration used for a detector: its most recent record (by
 * calibration date, then by entry), or null when it has none.
 */
export function currentCalibration(
  detectorId: number | null,
  transaction?: Transaction,
): Promise<DetectorCalibration | null> {
  if (detectorId === null) return Promise.resolve(null);
  return DetectorCalibration.findOne({
    where: { detectorId },
    order: [
      ['calibratedOn', 'DESC'],
      ['id', 'DESC'],
    ],
    transaction,
  });
}

function calibrationFit(record: DetectorCalibration): CalibrationFit {
  return {
    model: record.model,
    a: record.parameters.a,
    b: record.parameters.b,
    rSquared: record.rSquared,
    residuals: record.residuals,
    residualSd: record.residualSd,
  };
}

/**
 * The acquisition facts the analysis uses: the file's, with the user's
 * corrections laid over them (as pairing does), so a corrected mAs counts.
 */
function correctedAcquisition(decoded: Acquisition, image: Image): Acquisition {
  const corrected: Record<string, unknown> = { ...decoded };
  for (const [field, entry] of Object.entries(image.corrections)) {
    if (entry) corrected[field] = entry.value;
  }
  // Correctable fields are named and typed as the decoder's (image.schema.ts).
  return corrected as unknown as Acquisition;
}

async function loadAnalysisImage(
  image: Image,
  layout: RegionLayoutRecord,
  placement: ImageRegion | undefined,
  deps: ResultsDeps,
): Promise<AnalysisImage> {
  let bytes: Buffer;
  try {
    bytes = await deps.store.read(image.storageKey);
  } catch {
    throw new ResultFailure(
      'image_unreadable',
      `The stored file of ${image.originalName} cannot be read.`,
    );
  }
  try {
    const decoded = await decodeDicom(bytes, { frame: 0 });
    const acquisition = correctedAcquisition(decoded.acquisition, image);
    const imager = image.corrections.imagerPixelSpacingMm?.value;
    const plain = image.corrections.pixelSpacingMm?.value;
    const pixelSpacing = imager
      ? { ...imager, source: 'ImagerPixelSpacing' as const }
      : !decoded.pixelSpacing && plain
        ? { ...plain, source: 'PixelSpacing' as const }
        : decoded.pixelSpacing;
    return {
      ...decoded,
      acquisition,
      pixelSpacing,
      label: image.originalName,
      layout: placedLayoutFor(layout, placement, pixelSpacing),
    };
  } catch (error) {
    if (error instanceof DomainError) {
      throw new ResultFailure(
        error.code === 'region_invalid' ? error.code : 'image_unreadable',
        `${image.originalName}: ${error.message}`,
      );
    }
    throw error;
  }
}

interface StudyContext {
  study: Study;
  layout: RegionLayoutRecord | null;
  placements: Map<number, ImageRegion>;
  images: Map<number, Image>;
  grids: Map<number, Grid>;
  calibration: DetectorCalibration | null;
  settings: AnalysisSettings;
}

function optionsFor(
  context: StudyContext,
  set: ConditionImageSet,
): StoredAnalysisOptions {
  const c = context.calibration;
  return {
    settings: context.settings,
    calibration: c
      ? {
          id: c.id,
          detectorId: c.detectorId,
          calibratedOn: c.calibratedOn,
          model: c.model,
          rSquared: c.rSquared,
        }
      : null,
    statedScatterTransmission:
      context.grids.get(set.condition.gridId)?.statedTs ?? null,
    layout: context.layout
      ? { id: context.layout.id, name: context.layout.name }
      : null,
    images: { grid: set.grid, noGrid: set.noGrid },
  };
}

async function analyseSet(
  context: StudyContext,
  set: ConditionImageSet,
  deps: ResultsDeps,
): Promise<ConditionAnalysisResult> {
  const layout = context.layout;
  if (!layout) {
    throw new ResultFailure(
      'layout_missing',
      'The study has no region layout yet: draw one in the region editor and save it.',
    );
  }
  if (set.grid.length === 0 || set.noGrid.length === 0) {
    throw new ResultFailure(
      'images_missing',
      `This condition has ${set.grid.length} image(s) with the grid and ${set.noGrid.length} without; it needs at least one of each.`,
    );
  }
  const load = (entries: ConditionImageSet['grid']) =>
    Promise.all(
      entries.map((e) => {
        const image = context.images.get(e.imageId)!;
        return loadAnalysisImage(
          image,
          layout,
          context.placements.get(image.id),
          deps,
        );
      }),
    );
  const [gridImages, noGridImages] = [
    await load(set.grid),
    await load(set.noGrid),
  ];
  return analyseCondition({
    gridImages,
    noGridImages,
    layout: toRegionLayout(layout),
    options: {
      ...context.settings,
      calibration: context.calibration
        ? calibrationFit(context.calibration)
        : null,
      statedScatterTransmission:
        context.grids.get(set.condition.gridId)?.statedTs ?? null,
    },
  });
}

/**
 * Serialises the engine's result for JSONB. Non-finite numbers have no JSON
 * form; any found is stored as null and named in a warning, never dropped
 * silently.
 */
function jsonResult(
  value: unknown,
  warnings: Warning[],
): Record<string, unknown> {
  const paths: string[] = [];
  const text = JSON.stringify(value, function (key, v: unknown) {
    if (typeof v === 'number' && !Number.isFinite(v)) {
      paths.push(key);
      return null;
    }
    return v;
  });
  if (paths.length > 0) {
    warnings.push({
      code: 'non_finite_values',
      message: `Some values of the analysis are not finite numbers and are shown empty: ${[...new Set(paths)].slice(0, 5).join(', ')}.`,
    });
  }
  return JSON.parse(text) as Record<string, unknown>;
}

function uniqueWarnings(warnings: Warning[]): Warning[] {
  const seen = new Set<string>();
  return warnings.filter((w) => {
    const key = `${w.code}\n${w.message}`;
    if (seen.has(key)) return false;
    seen.add(key);
    return true;
  });
}

async function storeDone(
  row: ConditionAnalysis,
  options: StoredAnalysisOptions,
  analysis: ConditionAnalysisResult,
  startedFrom: string | null,
): Promise<void> {
  const primary = analysis.objects[0]!;
  const warnings = uniqueWarnings([
    ...analysis.warnings,
    ...primary.figures.warnings,
    ...[...analysis.images.grid, ...analysis.images.noGrid].flatMap((image) =>
      image.warnings.map((w) => ({
        code: w.code,
        message: `${image.label}: ${w.message}`,
      })),
    ),
  ]);
  const result = jsonResult(
    { analysis, primaryObject: primary.name } satisfies StoredAnalysisResult,
    warnings,
  );
  const figures = flattenConditionFigures(primary.figures);
  await sequelize.transaction(async (transaction) => {
    const newer = await overtaken(row.studyId, startedFrom, transaction);
    await row.update(
      {
        status: newer ? 'queued' : 'done',
        options: options as unknown as Record<string, unknown>,
        result,
        verdictOutcome: primary.figures.verdict?.outcome ?? null,
        verdictSentence: primary.figures.verdict?.sentence ?? null,
        warnings,
        errorCode: null,
        errorMessage: null,
        computedAt: new Date(),
      },
      { transaction },
    );
    await ConditionFigure.destroy({
      where: { analysisId: row.id },
      transaction,
    });
    await ConditionFigure.bulkCreate(
      figures.map(({ key, estimate }) => ({
        analysisId: row.id,
        studyId: row.studyId,
        conditionId: row.conditionId,
        figure: key,
        value: estimate.value,
        standardError: estimate.standardError,
        ciLow: estimate.ci95.low,
        ciHigh: estimate.ci95.high,
        degreesOfFreedom: estimate.degreesOfFreedom,
        n: estimate.n,
        basis: estimate.basis,
      })),
      { transaction },
    );
  });
}

async function storeFailed(
  row: ConditionAnalysis,
  options: StoredAnalysisOptions,
  failure: { code: string; message: string },
  startedFrom: string | null,
): Promise<void> {
  const { code, message } = failure;
  await sequelize.transaction(async (transaction) => {
    const newer = await overtaken(row.studyId, startedFrom, transaction);
    await row.update(
      {
        status: newer ? 'queued' : 'failed',
        options: options as unknown as Record<string, unknown>,
        result: null,
        verdictOutcome: null,
        verdictSentence: null,
        warnings: [],
        errorCode: code,
        errorMessage: message,
        computedAt: new Date(),
      },
      { transaction },
    );
    await ConditionFigure.destroy({
      where: { analysisId: row.id },
      transaction,
    });
  });
}

async function loadContext(
  study: Study,
  sets: ConditionImageSet[],
): Promise<StudyContext> {
  const imageIds = sets.flatMap((s) =>
    [...s.grid, ...s.noGrid].map((e) => e.imageId),
  );
  const layout = await findStudyLayout(study.id);
  const [images, grids, calibration, settings, placements] = await Promise.all([
    Image.findAll({ where: { id: { [Op.in]: imageIds } } }),
    Grid.findAll({
      where: { id: { [Op.in]: sets.map((s) => s.condition.gridId) } },
    }),
    currentCalibration(study.detectorId),
    studyAnalysisSettings(study.id),
    layout
      ? ImageRegion.findAll({
          where: { layoutId: layout.id, imageId: { [Op.in]: imageIds } },
        })
      : Promise.resolve([]),
  ]);
  return {
    study,
    layout,
    placements: new Map(placements.map((p) => [p.imageId, p])),
    images: new Map(images.map((i) => [i.id, i])),
    grids: new Map(grids.map((g) => [g.id, g])),
    calibration,
    settings,
  };
}

async function analysisRowFor(
  condition: StudyCondition,
): Promise<ConditionAnalysis> {
  const [row] = await ConditionAnalysis.findOrCreate({
    where: { conditionId: condition.id },
    defaults: {
      studyId: condition.studyId,
      conditionId: condition.id,
      status: 'queued',
      options: {},
      result: null,
      verdictOutcome: null,
      verdictSentence: null,
      warnings: [],
      errorCode: null,
      errorMessage: null,
      computedAt: null,
    },
  });
  return row;
}

/** How a recomputation ended. */
export interface RecomputeSummary {
  studyId: number;
  done: number;
  failed: number;
}

/**
 * Recomputes every condition of a study, one after another: gathers its
 * assigned images (replicates in order), the study's layout placed on each
 * image (offset and own regions), the detector's current calibration, the
 * grid's stated Ts and the study's settings; runs the analysis engine; and
 * stores each condition's analysis with one `condition_figures` row per
 * figure of the layout's first object, in one transaction per condition.
 * A condition that cannot be analysed is marked failed with a code and a
 * plain message (layout_missing, images_missing, image_unreadable, or the
 * engine's region_empty / region_invalid / analysis_failed …) and its old
 * figures are removed; the others go on. The progress is visible through
 * the rows' statuses (running while computed).
 * @returns the counts; zeros when the study no longer exists or is
 *   submitted or signed (its figures are what was reviewed).
 * @throws only for failures outside the analysis (database down).
 */
export async function recomputeStudy(
  studyId: number,
  deps: ResultsDeps,
): Promise<RecomputeSummary> {
  const summary = { studyId, done: 0, failed: 0 };
  const study = await Study.findByPk(studyId);
  // A job queued while the study was open may run after it was submitted:
  // the reviewed figures must stay as they were.
  if (!study || !isOpenForChanges(study.status)) return summary;
  const startedFrom = await latestRequest(study.id);
  const sets = await conditionImageSets(study.id);
  const context = await loadContext(study, sets);
  for (const set of sets) {
    const row = await analysisRowFor(set.condition);
    const options = optionsFor(context, set);
    await row.update({ status: 'running' });
    try {
      await storeDone(
        row,
        options,
        await analyseSet(context, set, deps),
        startedFrom,
      );
      summary.done += 1;
    } catch (error) {
      summary.failed += 1;
      if (error instanceof ResultFailure || error instanceof DomainError) {
        await storeFailed(row, options, error, startedFrom);
      } else {
        console.error(
          `analysis of condition ${set.condition.id} failed:`,
          error,
        );
        await storeFailed(
          row,
          options,
          {
            code: 'internal_error',
            message:
              'The analysis stopped on an unexpected error, which was logged; try again or tell an administrator.',
          },
          startedFrom,
        );
      }
    }
  }
  await recordAudit(
    { actorId: null, ipAddress: null },
    {
      action: 'study.results_computed',
      targetType: STUDY_AUDIT_TARGET,
      targetId: study.id,
      details: {
        ...summary,
        layoutId: context.layout?.id ?? null,
        settings: context.settings,
      },
    },
  );
  return summary;
}

/**
 * Records who asked for a recomputation and with which settings; the
 * caller then enqueues it.
 */
export async function recordRecomputeRequest(
  studyId: number,
  settings: AnalysisSettings | undefined,
  audit: AuditContext,
): Promise<void> {
  await recordAudit(audit, {
    action: 'study.results_recompute_requested',
    targetType: STUDY_AUDIT_TARGET,
    targetId: studyId,
    details: settings ? { settings } : {},
  });
}

/** The stored analyses of a study with their figures, by condition id. */
export async function loadStudyAnalyses(
  studyId: number,
): Promise<Map<number, ConditionAnalysis & { figures?: ConditionFigure[] }>> {
  const rows = await ConditionAnalysis.findAll({
    where: { studyId },
    include: [{ model: ConditionFigure, as: 'figures' }],
  });
  return new Map(rows.map((r) => [r.conditionId, r]));
}
