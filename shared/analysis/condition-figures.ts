import { DomainError } from '../errors.ts';
import type { Warning } from '../warnings.ts';
import type { BeamStopFit } from './beam-stop.ts';
import type { Estimate, UncertaintyBasis } from './estimate.ts';
import {
  estimateFromReplicates,
  propagateEstimates,
  statedEstimate,
} from './estimate.ts';
import type { CnrDefinition, ImageFigures } from './image-figures.ts';
import type { GridVerdict } from './verdict.ts';
import { gridVerdict } from './verdict.ts';
import type { WelchTestResult } from './welch-test.ts';
import { welchTTest } from './welch-test.ts';

/** The dose measure D in SIF = (CNR_g/√D_g)/(CNR_ng/√D_ng). */
export type DoseMeasure = 'mas' | 'dap' | 'entrance';

/** What each dose measure is, with its unit. */
export const DOSE_MEASURE_LABELS: Record<DoseMeasure, string> = {
  mas: 'tube exposure (mAs)',
  dap: 'dose–area product (dGy·cm²)',
  entrance: 'entrance dose (mGy)',
};

/** One object/background pair measured on one image, with its exposure. */
export interface ImageMeasurement {
  figures: ImageFigures;
  /** Tube exposure in mAs (most precise attribute), null when unknown. */
  exposureMas: number | null;
  /** The chosen dose measure D for this image, null when unknown. */
  dose: number | null;
  /** Beam-stop fit of this image, when it carries lead-disc shadows. */
  beamStop: BeamStopFit | null;
}

/** Options of {@link conditionFigures}. */
export interface ConditionFigureOptions {
  doseMeasure: DoseMeasure;
  cnrDefinition: CnrDefinition;
  /** Scatter transmission stated for the grid (e.g. by its maker). */
  statedScatterTransmission?: number | null;
}

/** Figures of one side (grid or no grid) of a condition, over its replicates. */
export interface SideFigures {
  images: number;
  /** Mean exposure of the replicates in mAs, null when unknown. */
  exposureMas: number | null;
  /** Mean dose D, null when unknown. */
  dose: number | null;
  contrast: Estimate;
  cnr: Estimate;
  cnrPooled: Estimate;
  snr: Estimate;
  backgroundSignal: Estimate;
  signalDifference: Estimate;
  backgroundSignalPerMas: Estimate | null;
  signalDifferencePerMas: Estimate | null;
  /** CNR/√D. */
  cnrPerRootDose: Estimate | null;
  /** FOM = CNR²/D. */
  figureOfMerit: Estimate | null;
  scatterToPrimaryRatio: Estimate | null;
  scatterFraction: Estimate | null;
}

/** How the condition's figures were computed. */
export interface ConditionMethod {
  cnrDefinition: CnrDefinition;
  doseMeasure: DoseMeasure;
  doseLabel: string;
  transmissions: string;
  snrImprovementFactor: string;
  uncertainty: UncertaintyBasis;
  scatterTransmissionSource: 'beam-stop' | 'stated' | null;
  predictedCifPrimaryTransmission: 'beam-stop' | 'object' | null;
  label: string;
}

/** Every grid figure of a condition, each with its 95 % interval. */
export interface ConditionFigures {
  grid: SideFigures;
  noGrid: SideFigures;
  contrastImprovementFactor: Estimate;
  totalTransmission: Estimate | null;
  primaryTransmission: Estimate | null;
  buckyFactor: Estimate | null;
  snrImprovementFactor: Estimate | null;
  doseSaving: Estimate | null;
  imageImprovementFactor: Estimate | null;
  scatterTransmission: Estimate | null;
  selectivity: Estimate | null;
  /** SPR and scatter fraction without the grid (beam stop). */
  scatterToPrimaryRatio: Estimate | null;
  scatterFraction: Estimate | null;
  /** K predicted from SPR, Tp and Ts, to set beside the measured CIF. */
  predictedContrastImprovementFactor: Estimate | null;
  welch: WelchTestResult | null;
  verdict: GridVerdict | null;
  method: ConditionMethod;
  warnings: Warning[];
}

type Pick = (m: ImageMeasurement) => Estimate | null;

/** One image: its own estimate; replicates: mean and Student t interval. */
function acrossReplicates(
  images: readonly ImageMeasurement[],
  pick: Pick,
): Estimate | null {
  const estimates = images.map(pick);
  if (estimates.some((e) => e === null)) return null;
  const present = estimates as Estimate[];
  if (present.length === 1) return present[0]!;
  return estimateFromReplicates(present.map((e) => e.value));
}

function perMas(value: Estimate, exposureMas: number | null): Estimate | null {
  if (exposureMas === null || !(exposureMas > 0)) return null;
  return propagateEstimates((v) => v / exposureMas, [value]);
}

function meanOrNull(values: Array<number | null>): number | null {
  if (values.some((v) => v === null || !(v > 0))) return null;
  return (values as number[]).reduce((s, v) => s + v, 0) / values.length;
}

function spreadWarning(
  side: string,
  what: string,
  values: Array<number | null>,
  warnings: Warning[],
): void {
  const known = values.filter((v): v is number => v !== null);
  if (known.length < 2) return;
  const max = Math.max(...known);
  const min = Math.min(...known);
  if (max - min > 0.01 * max) {
    warnings.push({
      code: 'replicate_exposures_differ',
      message: `The ${side} replicates differ in ${what} (${min} to ${max}); each is normalised by its own value.`,
    });
  }
}

function sideFigures(
  side: string,
  images: readonly ImageMeasurement[],
  warnings: Warning[],
): SideFigures {
  if (images.length === 0) {
    throw new DomainError(
      'analysis_failed',
      `The ${side} side of the condition has no image.`,
    );
  }
  spreadWarning(
    side,
    'exposure',
    images.map((m) => m.exposureMas),
    warnings,
  );
  spreadWarning(
    side,
    'dose',
    images.map((m) => m.dose),
    warnings,
  );
  const withBeamStop = images.every((m) => m.beamStop !== null);
  return {
    images: images.length,
    exposureMas: meanOrNull(images.map((m) => m.exposureMas)),
    dose: meanOrNull(images.map((m) => m.dose)),
    contrast: acrossReplicates(images, (m) => m.figures.contrast)!,
    cnr: acrossReplicates(images, (m) => m.figures.cnr)!,
    cnrPooled: acrossReplicates(images, (m) => m.figures.cnrPooled)!,
    snr: acrossReplicates(images, (m) => m.figures.snr)!,
    backgroundSignal: acrossReplicates(
      images,
      (m) => m.figures.backgroundSignal,
    )!,
    signalDifference: acrossReplicates(
      images,
      (m) => m.figures.signalDifference,
    )!,
    backgroundSignalPerMas: acrossReplicates(images, (m) =>
      perMas(m.figures.backgroundSignal, m.exposureMas),
    ),
    signalDifferencePerMas: acrossReplicates(images, (m) =>
      perMas(m.figures.signalDifference, m.exposureMas),
    ),
    cnrPerRootDose: acrossReplicates(images, (m) =>
      m.dose !== null && m.dose > 0
        ? propagateEstimates((c) => c / Math.sqrt(m.dose!), [m.figures.cnr])
        : null,
    ),
    figureOfMerit: acrossReplicates(images, (m) =>
      m.dose !== null && m.dose > 0
        ? propagateEstimates((c) => (c * c) / m.dose!, [m.figures.cnr])
        : null,
    ),
    scatterToPrimaryRatio: withBeamStop
      ? acrossReplicates(images, (m) => m.beamStop!.scatterToPrimaryRatio)
      : null,
    scatterFraction: withBeamStop
      ? acrossReplicates(images, (m) => m.beamStop!.scatterFraction)
      : null,
  };
}

/** A figure that may fail (zero denominator): null with a warning instead. */
function attempt(
  name: string,
  warnings: Warning[],
  compute: () => Estimate | null,
): Estimate | null {
  try {
    return compute();
  } catch (error) {
    if (!(error instanceof DomainError)) throw error;
    warnings.push({
      code: 'figure_undefined',
      message: `${name} could not be computed: ${error.message}`,
    });
    return null;
  }
}

function ratio(a: Estimate | null, b: Estimate | null): Estimate | null {
  return a && b ? propagateEstimates((x, y) => x / y, [a, b]) : null;
}

function basisOf(estimates: Array<Estimate | null>): UncertaintyBasis {
  const kinds = new Set(
    estimates
      .filter((e): e is Estimate => e !== null)
      .map((e) => e.basis)
      .filter((b) => b !== 'stated'),
  );
  if (kinds.size === 1) return [...kinds][0]!;
  return kinds.size === 0 ? 'stated' : 'mixed';
}

/**
 * Grid figures of one condition (one beam quality and phantom), from the
 * object/background measurements of its grid and no-grid images:
 * CIF = C_g/C_ng; Tt = (S_bg,g/mAs_g)/(S_bg,ng/mAs_ng); Tp the same for ΔS;
 * B = 1/Tt; SIF = (CNR_g/√D_g)/(CNR_ng/√D_ng); dose saving 1 − 1/SIF²;
 * Q = Tp²/Tt; with Ts (beam stop on both sides, or stated) Σ = Tp/Ts and the
 * predicted K = (1+SPR)·Tp/(Tp + SPR·Ts) beside the measured CIF (with beam
 * stops on both sides this equals (1 − SF_g)/(1 − SF_ng), which is how it
 * is propagated).
 *
 * Each side's figure is the mean over its replicate images with a Student t
 * interval (one image: the delta-method interval); ratios are propagated
 * with Welch–Satterthwaite degrees of freedom. Figures that need an
 * exposure or dose the headers lack are null, with a warning.
 *
 * @throws DomainError('analysis_failed') when a side has no image.
 * @see PHYSICS.md §2–§3; IEC 60627:2013; Bor et al., J Med Phys
 *   2016;41:21–28; JCGM 100:2008 Annex G.
 */
export function conditionFigures(
  gridImages: readonly ImageMeasurement[],
  noGridImages: readonly ImageMeasurement[],
  options: ConditionFigureOptions,
): ConditionFigures {
  const warnings: Warning[] = [];
  const grid = sideFigures('grid', gridImages, warnings);
  const noGrid = sideFigures('no-grid', noGridImages, warnings);
  if (grid.exposureMas === null || noGrid.exposureMas === null) {
    warnings.push({
      code: 'exposure_missing',
      message:
        'An image has no exposure (mAs), so transmissions and the Bucky factor are not given.',
    });
  }
  if (grid.dose === null || noGrid.dose === null) {
    warnings.push({
      code: 'dose_missing',
      message: `An image has no ${DOSE_MEASURE_LABELS[options.doseMeasure]}, so the SNR improvement factor at equal dose is not given.`,
    });
  }
  const cif = attempt('The contrast improvement factor', warnings, () =>
    ratio(grid.contrast, noGrid.contrast),
  );
  if (cif === null) {
    throw new DomainError(
      'analysis_failed',
      'The no-grid contrast is zero, so no contrast improvement factor exists; check the object region.',
    );
  }
  const tt = attempt('Total transmission', warnings, () =>
    ratio(grid.backgroundSignalPerMas, noGrid.backgroundSignalPerMas),
  );
  const tp = attempt('Primary transmission', warnings, () =>
    ratio(grid.signalDifferencePerMas, noGrid.signalDifferencePerMas),
  );
  for (const [name, t] of [
    ['total', tt],
    ['primary', tp],
  ] as const) {
    if (t && t.value > 1) {
      warnings.push({
        code: 'transmission_above_one',
        message: `The measured ${name} transmission is ${t.value.toFixed(3)}, above 1: check the exposures, the regions and the grid/no-grid labels.`,
      });
    }
  }
  const bucky = attempt('The Bucky factor', warnings, () =>
    tt ? propagateEstimates((t) => 1 / t, [tt]) : null,
  );
  const sif = attempt('The SNR improvement factor', warnings, () =>
    ratio(grid.cnrPerRootDose, noGrid.cnrPerRootDose),
  );
  const doseSaving = attempt('The dose saving', warnings, () =>
    sif ? propagateEstimates((s) => 1 - 1 / (s * s), [sif]) : null,
  );
  const q = attempt('The image improvement factor', warnings, () =>
    tp && tt ? propagateEstimates((p, t) => (p * p) / t, [tp, tt]) : null,
  );

  const beamStopBoth =
    gridImages.every((m) => m.beamStop) &&
    noGridImages.every((m) => m.beamStop);
  const scatterPerMas = (images: readonly ImageMeasurement[]) =>
    acrossReplicates(images, (m) =>
      perMas(m.beamStop!.scatterSignal, m.exposureMas),
    );
  let ts: Estimate | null = null;
  let tsSource: ConditionMethod['scatterTransmissionSource'] = null;
  if (beamStopBoth) {
    ts = attempt('Scatter transmission', warnings, () =>
      ratio(scatterPerMas(gridImages), scatterPerMas(noGridImages)),
    );
    if (ts) tsSource = 'beam-stop';
  } else if (
    options.statedScatterTransmission !== undefined &&
    options.statedScatterTransmission !== null
  ) {
    ts = statedEstimate(options.statedScatterTransmission);
    tsSource = 'stated';
  }
  const selectivity = attempt('Selectivity', warnings, () =>
    ts && tp ? ratio(tp, ts) : null,
  );
  const spr = noGrid.scatterToPrimaryRatio;
  // With beam stops on both sides K = (1+SPR)·Tp/(Tp + SPR·Ts) with the
  // beam-stop Tp reduces to (1 − SF_g)/(1 − SF_ng); propagating that keeps
  // SPR, Tp and Ts (which share the no-grid scatter) from being treated as
  // independent, and needs no exposure.
  let tpSource: ConditionMethod['predictedCifPrimaryTransmission'] = null;
  const predictedK = attempt(
    'The predicted contrast improvement factor',
    warnings,
    () => {
      if (beamStopBoth && grid.scatterFraction && noGrid.scatterFraction) {
        const k = propagateEstimates(
          (sfGrid, sfNoGrid) => (1 - sfGrid) / (1 - sfNoGrid),
          [grid.scatterFraction, noGrid.scatterFraction],
        );
        tpSource = 'beam-stop';
        return k;
      }
      if (spr && tp && ts) {
        const k = propagateEstimates(
          (r, p, s) => ((1 + r) * p) / (p + r * s),
          [spr, tp, ts],
        );
        tpSource = 'object';
        return k;
      }
      return null;
    },
  );

  let welch: WelchTestResult | null = null;
  if (
    gridImages.length >= 2 &&
    noGridImages.length >= 2 &&
    grid.cnrPerRootDose &&
    noGrid.cnrPerRootDose
  ) {
    const normalised = (images: readonly ImageMeasurement[]) =>
      images.map((m) => m.figures.cnr.value / Math.sqrt(m.dose!));
    try {
      welch = welchTTest(normalised(gridImages), normalised(noGridImages));
    } catch (error) {
      if (!(error instanceof DomainError)) throw error;
      warnings.push({ code: 'welch_test_undefined', message: error.message });
    }
  }

  return {
    grid,
    noGrid,
    contrastImprovementFactor: cif,
    totalTransmission: tt,
    primaryTransmission: tp,
    buckyFactor: bucky,
    snrImprovementFactor: sif,
    doseSaving,
    imageImprovementFactor: q,
    scatterTransmission: ts,
    selectivity,
    scatterToPrimaryRatio: spr,
    scatterFraction: noGrid.scatterFraction,
    predictedContrastImprovementFactor: predictedK,
    welch,
    verdict: sif ? gridVerdict(sif, welch) : null,
    method: {
      cnrDefinition: options.cnrDefinition,
      doseMeasure: options.doseMeasure,
      doseLabel: DOSE_MEASURE_LABELS[options.doseMeasure],
      transmissions:
        'same-technique relations normalised per mAs: Tt from S_bg, Tp from ΔS = S_bg − S_obj (thin object)',
      snrImprovementFactor: `SIF = (CNR_g/√D_g)/(CNR_ng/√D_ng), D = ${DOSE_MEASURE_LABELS[options.doseMeasure]}`,
      uncertainty: basisOf([cif, tt, sif]),
      scatterTransmissionSource: tsSource,
      predictedCifPrimaryTransmission: tpSource,
      label:
        'field values from phantom images in a clinical room, not IEC 60627 stated values',
    },
    warnings,
  };
}
