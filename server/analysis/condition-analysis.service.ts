import type { CalibrationFit } from '../../shared/analysis/detector-calibration.ts';
import type {
  ConditionFigures,
  DoseMeasure,
  ImageMeasurement,
} from '../../shared/analysis/condition-figures.ts';
import {
  DOSE_MEASURE_LABELS,
  conditionFigures,
} from '../../shared/analysis/condition-figures.ts';
import type {
  CnrDefinition,
  ImageFigures,
  RegionSignal,
} from '../../shared/analysis/image-figures.ts';
import { CNR_FORMULAS } from '../../shared/analysis/image-figures.ts';
import type {
  Detrend,
  LayoutMeasurement,
} from '../../shared/analysis/layout-measurement.ts';
import { measureLayout } from '../../shared/analysis/layout-measurement.ts';
import type { RegionLayout } from '../../shared/analysis/region-layout.ts';
import { resolveRegionLayout } from '../../shared/analysis/region-layout.ts';
import type { SignalMethod } from '../../shared/analysis/signal-domain.ts';
import {
  WARNINGS_RESOLVED_BY_CALIBRATION,
  signalDomain,
} from '../../shared/analysis/signal-domain.ts';
import { DomainError } from '../../shared/errors.ts';
import {
  GRID_CONVERSION_TABLE_NAME,
  gridConversionFactor,
} from '../../shared/physics/grid-conversion.ts';
import { deviationIndex } from '../../shared/physics/exposure-index.ts';
import type { Warning } from '../../shared/warnings.ts';
import type { AnalysisImage } from './analysis-image.ts';
import { doseOf, signalSourceOf } from './analysis-image.ts';

/** Choices of the analysis; every one is echoed in `method`. */
export interface AnalysisOptions {
  /** Default 'background-sd' (CNR = ΔS/σ_bg). */
  cnrDefinition?: CnrDefinition;
  /** Default 'none'; 'plane' fits a plane over each object's backgrounds. */
  detrend?: Detrend;
  /**
   * Default 'region' (SD inside the image); 'replicate-difference' takes the
   * SD of the difference with the next replicate ÷ √2.
   */
  noise?: 'region' | 'replicate-difference';
  /** D of the SNR improvement factor; default 'mas'. */
  doseMeasure?: DoseMeasure;
  /** Detector calibration applied to every image, or null. */
  calibration?: CalibrationFit | null;
  /** Ts stated for the grid, used when there is no beam-stop series. */
  statedScatterTransmission?: number | null;
}

/** Input of {@link analyseCondition}. */
export interface ConditionAnalysisInput {
  /** Replicates with the grid (same set-up); at least one. */
  gridImages: AnalysisImage[];
  /** Replicates without the grid; at least one. */
  noGridImages: AnalysisImage[];
  layout: RegionLayout;
  options?: AnalysisOptions;
}

/** Exposure index facts of one image (IEC 62494-1). */
export interface ExposureIndexReport {
  exposureIndex: number | null;
  targetExposureIndex: number | null;
  deviationIndexFromFile: number | null;
  /** 10·log10(EI/EI_T), null without both. */
  deviationIndexRecomputed: number | null;
}

/** One image of the condition. */
export interface ImageSummary {
  label: string;
  exposureMas: number | null;
  dose: number | null;
  kvp: number | null;
  grid: string[] | null;
  exposureIndex: ExposureIndexReport;
  signalMethod: SignalMethod;
  warnings: Warning[];
}

/** One object on one image. */
export interface ImageObjectSummary {
  label: string;
  object: RegionSignal;
  background: RegionSignal;
  /** Plain background SD (always reported). */
  backgroundSampleSd: number;
  /** SD about the background plane, when detrending. */
  backgroundSdAboutPlane: number | null;
  /** Difference-image noise, when taken from replicates. */
  replicateDifferenceSd: number | null;
  figures: ImageFigures;
}

/** Every figure of one object in the condition. */
export interface ObjectAnalysis {
  name: string;
  backgrounds: string[];
  figures: ConditionFigures;
  images: { grid: ImageObjectSummary[]; noGrid: ImageObjectSummary[] };
}

/** The film-era comparison, shown only as a legacy figure. */
export interface LegacyConversion {
  table: string;
  gridRatio: number;
  factor: number;
  noGridExposureMas: number;
  /** mAs the film-era rule would ask for with this grid. */
  legacyGridExposureMas: number;
  measuredGridExposureMas: number | null;
  note: string;
}

/** How the condition was analysed. */
export interface AnalysisMethod {
  signal: string[];
  signalMethod: SignalMethod | 'mixed';
  detrend: Detrend;
  noise: 'region' | 'replicate-difference';
  cnrDefinition: CnrDefinition;
  cnr: string;
  doseMeasure: DoseMeasure;
  doseLabel: string;
  uncertainty: string;
}

/** Result of {@link analyseCondition}. */
export interface ConditionAnalysis {
  condition: {
    kvp: number | null;
    stationName: string | null;
    bodyPartThicknessMm: number | null;
    grid: string[] | null;
    gridId: string | null;
    gridExposureMas: number | null;
    noGridExposureMas: number | null;
  };
  images: { grid: ImageSummary[]; noGrid: ImageSummary[] };
  objects: ObjectAnalysis[];
  legacyConversion: LegacyConversion | null;
  method: AnalysisMethod;
  warnings: Warning[];
}

function exposureIndexReport(
  image: AnalysisImage,
  warnings: Warning[],
): ExposureIndexReport {
  const a = image.acquisition;
  const recomputed =
    a.exposureIndex !== null &&
    a.targetExposureIndex !== null &&
    a.exposureIndex > 0 &&
    a.targetExposureIndex > 0
      ? deviationIndex(a.exposureIndex, a.targetExposureIndex)
      : null;
  if (
    recomputed !== null &&
    a.deviationIndex !== null &&
    Math.abs(recomputed - a.deviationIndex) > 0.1
  ) {
    warnings.push({
      code: 'deviation_index_mismatch',
      message: `${image.label}: the file's deviation index ${a.deviationIndex} differs from 10·log10(EI/EI_T) = ${recomputed.toFixed(2)} (IEC 62494-1).`,
    });
  }
  return {
    exposureIndex: a.exposureIndex,
    targetExposureIndex: a.targetExposureIndex,
    deviationIndexFromFile: a.deviationIndex,
    deviationIndexRecomputed: recomputed,
  };
}

function legacyConversion(
  gridImage: AnalysisImage,
  noGridExposureMas: number | null,
  gridExposureMas: number | null,
): LegacyConversion | null {
  const aspect = gridImage.acquisition.gridAspectRatio;
  if (!aspect || !(aspect[1] > 0) || noGridExposureMas === null) return null;
  const ratio = aspect[0] / aspect[1];
  let factor: number;
  try {
    factor = gridConversionFactor(ratio);
  } catch (error) {
    if (error instanceof DomainError) return null;
    throw error;
  }
  return {
    table: GRID_CONVERSION_TABLE_NAME,
    gridRatio: ratio,
    factor,
    noGridExposureMas,
    legacyGridExposureMas: noGridExposureMas * factor,
    measuredGridExposureMas: gridExposureMas,
    note: 'Film-era rule, a legacy comparison only: in digital radiography it does not mean the dose must rise (Kawashima et al., JACMP 2023).',
  };
}

interface MeasuredImage {
  image: AnalysisImage;
  signalDescription: string;
  summary: ImageSummary;
  measurement: LayoutMeasurement;
}

function measureSide(
  images: readonly AnalysisImage[],
  layout: RegionLayout,
  options: Required<
    Omit<AnalysisOptions, 'calibration' | 'statedScatterTransmission'>
  > & {
    calibration: CalibrationFit | null;
  },
  warnings: Warning[],
): MeasuredImage[] {
  const domains = images.map((image) =>
    signalDomain(signalSourceOf(image), options.calibration),
  );
  if (options.noise === 'replicate-difference' && images.length < 2) {
    warnings.push({
      code: 'no_replicate_for_noise',
      message: `${images[0]?.label ?? 'An image'} has no replicate, so its noise is the region SD, not a difference-image SD.`,
    });
  }
  return images.map((image, i) => {
    const imageWarnings = options.calibration
      ? image.warnings.filter(
          (w) => !WARNINGS_RESOLVED_BY_CALIBRATION.includes(w.code),
        )
      : [...image.warnings];
    const partnerIndex = (i + 1) % images.length;
    const partner = images[partnerIndex]!;
    let replicatePixels = null;
    if (options.noise === 'replicate-difference' && images.length >= 2) {
      if (partner.rows === image.rows && partner.columns === image.columns) {
        replicatePixels = domains[partnerIndex]!.pixels;
      } else {
        warnings.push({
          code: 'replicate_size_differs',
          message: `${image.label} and ${partner.label} differ in size, so no difference image was formed.`,
        });
      }
    }
    const resolved = resolveRegionLayout(
      image.layout ?? layout,
      image.pixelSpacing,
    );
    const domain = domains[i]!;
    const measurement = measureLayout(
      domain.pixels,
      image.columns,
      image.rows,
      resolved,
      domain.lut,
      {
        cnrDefinition: options.cnrDefinition,
        detrend: options.detrend,
        replicatePixels,
      },
    );
    for (const w of measurement.warnings) {
      imageWarnings.push({ code: w.code, message: w.message });
    }
    return {
      image,
      measurement,
      signalDescription: domain.description,
      summary: {
        label: image.label,
        exposureMas: image.acquisition.exposureMas,
        dose: doseOf(image, options.doseMeasure),
        kvp: image.acquisition.kvp,
        grid: image.acquisition.grid,
        exposureIndex: exposureIndexReport(image, warnings),
        signalMethod: domain.method,
        warnings: imageWarnings,
      },
    };
  });
}

function objectSummary(
  measured: MeasuredImage,
  objectIndex: number,
): ImageObjectSummary {
  const o = measured.measurement.objects[objectIndex]!;
  return {
    label: measured.image.label,
    object: o.object,
    background: o.background,
    backgroundSampleSd: o.background.sampleSd,
    backgroundSdAboutPlane: o.plane?.sampleSdAboutPlane ?? null,
    replicateDifferenceSd: o.differenceNoise?.sampleSd ?? null,
    figures: o.figures,
  };
}

function measurementFor(
  measured: MeasuredImage,
  objectIndex: number,
): ImageMeasurement {
  return {
    figures: measured.measurement.objects[objectIndex]!.figures,
    exposureMas: measured.summary.exposureMas,
    dose: measured.summary.dose,
    beamStop: measured.measurement.beamStop,
  };
}

function mean(values: Array<number | null>): number | null {
  const known = values.filter((v): v is number => v !== null);
  return known.length === values.length && known.length > 0
    ? known.reduce((s, v) => s + v, 0) / known.length
    : null;
}

/**
 * Analyses one condition (a grid and a no-grid set of replicate images at
 * one beam quality and phantom) with a region layout: puts every image in
 * its signal domain (detector calibration, or inverted/stored values as the
 * ingest warnings say), measures every region, and gives for every object
 * all grid figures with 95 % intervals, the verdict at equal dose, the
 * exposure and deviation indices, the film-era comparison when the grid
 * ratio is known, and the method used.
 *
 * @param input grid and no-grid images (DecodedImage + label), a layout and
 *   options (see {@link AnalysisOptions} for the defaults).
 * @returns see {@link ConditionAnalysis}; figures that need a missing
 *   exposure or dose are null with a warning.
 * @throws DomainError('validation_failed') without images on a side;
 *   DomainError('region_empty' | 'region_invalid' | 'analysis_failed') when
 *   a region or figure cannot be measured.
 * @see PHYSICS.md §2–§4; shared/analysis/condition-figures.ts.
 */
export function analyseCondition(
  input: ConditionAnalysisInput,
): ConditionAnalysis {
  const { gridImages, noGridImages, layout } = input;
  if (gridImages.length === 0 || noGridImages.length === 0) {
    throw new DomainError(
      'validation_failed',
      'A condition needs at least one image with the grid and one without.',
    );
  }
  const options = {
    cnrDefinition: input.options?.cnrDefinition ?? 'background-sd',
    detrend: input.options?.detrend ?? 'none',
    noise: input.options?.noise ?? 'region',
    doseMeasure: input.options?.doseMeasure ?? 'mas',
    calibration: input.options?.calibration ?? null,
  } as const;
  const warnings: Warning[] = [];
  const grid = measureSide(gridImages, layout, options, warnings);
  const noGrid = measureSide(noGridImages, layout, options, warnings);
  const objects = grid[0]!.measurement.objects.map((o, k): ObjectAnalysis => {
    const figures = conditionFigures(
      grid.map((m) => measurementFor(m, k)),
      noGrid.map((m) => measurementFor(m, k)),
      {
        doseMeasure: options.doseMeasure,
        cnrDefinition: options.cnrDefinition,
        statedScatterTransmission:
          input.options?.statedScatterTransmission ?? null,
      },
    );
    return {
      name: o.name,
      backgrounds: o.backgrounds,
      figures,
      images: {
        grid: grid.map((m) => objectSummary(m, k)),
        noGrid: noGrid.map((m) => objectSummary(m, k)),
      },
    };
  });
  const all = [...grid, ...noGrid];
  const methods = new Set(all.map((m) => m.summary.signalMethod));
  const descriptions = new Set(all.map((m) => m.signalDescription));
  const gridExposureMas = mean(grid.map((m) => m.summary.exposureMas));
  const noGridExposureMas = mean(noGrid.map((m) => m.summary.exposureMas));
  const first = gridImages[0]!.acquisition;
  const replicateBased = gridImages.length >= 2 && noGridImages.length >= 2;
  return {
    condition: {
      kvp: first.kvp,
      stationName: first.stationName,
      bodyPartThicknessMm: first.bodyPartThicknessMm,
      grid: first.grid,
      gridId: first.gridId,
      gridExposureMas,
      noGridExposureMas,
    },
    images: {
      grid: grid.map((m) => m.summary),
      noGrid: noGrid.map((m) => m.summary),
    },
    objects,
    legacyConversion: legacyConversion(
      gridImages[0]!,
      noGridExposureMas,
      gridExposureMas,
    ),
    method: {
      signal: [...descriptions],
      signalMethod: methods.size === 1 ? [...methods][0]! : 'mixed',
      detrend: options.detrend,
      noise: options.noise,
      cnrDefinition: options.cnrDefinition,
      cnr: CNR_FORMULAS[options.cnrDefinition],
      doseMeasure: options.doseMeasure,
      doseLabel: DOSE_MEASURE_LABELS[options.doseMeasure],
      uncertainty: replicateBased
        ? 'replicates: mean and Student t interval per side, ratios propagated (Welch–Satterthwaite ν)'
        : 'delta method from region SDs and pixel counts where a side has one image (uncorrelated pixel noise assumed)',
    },
    warnings,
  };
}
