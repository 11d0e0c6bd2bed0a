import type { DoseMeasure } from '../../shared/analysis/condition-figures.ts';
import { conditionFigures } from '../../shared/analysis/condition-figures.ts';
import type { CalibrationFit } from '../../shared/analysis/detector-calibration.ts';
import type { Estimate } from '../../shared/analysis/estimate.ts';
import type { ImageFigures } from '../../shared/analysis/image-figures.ts';
import { imageFigures } from '../../shared/analysis/image-figures.ts';
import {
  WARNINGS_RESOLVED_BY_CALIBRATION,
  signalDomain,
} from '../../shared/analysis/signal-domain.ts';
import type { Region } from '../../shared/roi/region-geometry.ts';
import type { RegionStatistics } from '../../shared/roi/region-statistics.ts';
import { regionStatistics } from '../../shared/roi/region-statistics.ts';
import type { Warning } from '../../shared/warnings.ts';
import type { AnalysisImage } from './analysis-image.ts';
import { doseOf, signalSourceOf } from './analysis-image.ts';

/** Region statistics as `lamella measure` prints them. */
export interface RoiStatsDto {
  roi: string;
  n: number;
  mean: number;
  /** Sample SD (n − 1). */
  sd: number;
  sdPopulation: number;
  min: number;
  max: number;
  median: number;
}

/** One side of `lamella compare --json`. */
export interface PairSideDto {
  object: RoiStatsDto;
  background: RoiStatsDto;
  contrast: number;
  cnr: number;
  cnrPooled: number;
  snr: number;
  exposureMas: number | null;
}

/** The exact object `lamella compare --json` prints. */
export interface PairComparisonDto {
  grid: PairSideDto;
  noGrid: PairSideDto;
  contrastImprovementFactor: number;
  primaryTransmission: number | null;
  totalTransmission: number | null;
  buckyFactor: number | null;
  snrImprovementFactor: number | null;
  doseSaving: number | null;
  warnings: Warning[];
}

/** Input of {@link comparePair}. */
export interface PairComparisonInput {
  gridImage: AnalysisImage;
  noGridImage: AnalysisImage;
  object: { region: Region; spec: string };
  background: { region: Region; spec: string };
  /** D of the SNR improvement factor; default mAs. */
  doseMeasure?: DoseMeasure;
  calibration?: CalibrationFit | null;
}

function roiStats(spec: string, stats: RegionStatistics): RoiStatsDto {
  return {
    roi: spec,
    n: stats.n,
    mean: stats.mean,
    sd: stats.sampleSd,
    sdPopulation: stats.populationSd,
    min: stats.min,
    max: stats.max,
    median: stats.median,
  };
}

interface MeasuredSide {
  dto: PairSideDto;
  figures: ImageFigures;
  dose: number | null;
  warnings: Warning[];
}

function measureSide(
  side: 'Grid image' | 'No-grid image',
  image: AnalysisImage,
  input: PairComparisonInput,
): MeasuredSide {
  const domain = signalDomain(signalSourceOf(image), input.calibration);
  const measure = (region: Region) =>
    regionStatistics(domain.pixels, image.columns, image.rows, region, {
      lut: domain.lut ?? undefined,
    });
  const object = measure(input.object.region);
  const background = measure(input.background.region);
  const figures = imageFigures(object.stats, background.stats);
  const imageWarnings = input.calibration
    ? image.warnings.filter(
        (w) => !WARNINGS_RESOLVED_BY_CALIBRATION.includes(w.code),
      )
    : image.warnings;
  const named = (prefix: string, list: readonly Warning[]): Warning[] =>
    list.map((w) => ({ code: w.code, message: `${prefix}: ${w.message}` }));
  return {
    dto: {
      object: roiStats(input.object.spec, object.stats),
      background: roiStats(input.background.spec, background.stats),
      contrast: figures.contrast.value,
      cnr: figures.cnrBackgroundSd.value,
      cnrPooled: figures.cnrPooled.value,
      snr: figures.snr.value,
      exposureMas: image.acquisition.exposureMas,
    },
    figures,
    dose: doseOf(image, input.doseMeasure ?? 'mas'),
    warnings: [
      ...named(side, imageWarnings),
      ...named(`${side}, object`, object.warnings),
      ...named(`${side}, background`, background.warnings),
      ...named(side, figures.warnings),
    ],
  };
}

const value = (estimate: Estimate | null): number | null =>
  estimate === null ? null : estimate.value;

/**
 * Compares one grid image with one no-grid image on an object and a
 * background region, in the signal domain of the images (calibration, or
 * inverted/stored values as the ingest warnings say). Transmissions are
 * normalised per mAs: Tt = (S_bg,g/mAs_g)/(S_bg,ng/mAs_ng), Tp the same for
 * ΔS, B = 1/Tt; SIF = (CNR_g/√D_g)/(CNR_ng/√D_ng) with D the chosen dose
 * measure (mAs by default); dose saving 1 − 1/SIF². Figures whose exposure
 * or dose is missing are null, with a warning.
 * @returns exactly the object `lamella compare --json` prints.
 * @throws DomainError('region_empty' | 'region_invalid' | 'analysis_failed')
 *   when a region or figure cannot be measured.
 * @see PHYSICS.md §3; shared/analysis/condition-figures.ts.
 */
export function comparePair(input: PairComparisonInput): PairComparisonDto {
  const grid = measureSide('Grid image', input.gridImage, input);
  const noGrid = measureSide('No-grid image', input.noGridImage, input);
  const measurement = (side: MeasuredSide) => ({
    figures: side.figures,
    exposureMas: side.dto.exposureMas,
    dose: side.dose,
    beamStop: null,
  });
  const figures = conditionFigures([measurement(grid)], [measurement(noGrid)], {
    doseMeasure: input.doseMeasure ?? 'mas',
    cnrDefinition: 'background-sd',
  });
  const warnings: Warning[] = [];
  const seen = new Set<string>();
  for (const w of [...grid.warnings, ...noGrid.warnings, ...figures.warnings]) {
    const key = `${w.code}\u0000${w.message}`;
    if (!seen.has(key)) {
      seen.add(key);
      warnings.push(w);
    }
  }
  return {
    grid: grid.dto,
    noGrid: noGrid.dto,
    contrastImprovementFactor: figures.contrastImprovementFactor.value,
    primaryTransmission: value(figures.primaryTransmission),
    totalTransmission: value(figures.totalTransmission),
    buckyFactor: value(figures.buckyFactor),
    snrImprovementFactor: value(figures.snrImprovementFactor),
    doseSaving: value(figures.doseSaving),
    warnings,
  };
}
