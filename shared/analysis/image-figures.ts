import { DomainError } from '../errors.ts';
import type { Warning } from '../warnings.ts';
import type { Estimate } from './estimate.ts';
import { estimateFromStandardError, propagateEstimates } from './estimate.ts';

/** CNR definitions Lamella offers; the one used is stored with every result. */
export type CnrDefinition = 'background-sd' | 'pooled-sd';

/** Human-readable formula of each CNR definition. */
export const CNR_FORMULAS: Record<CnrDefinition, string> = {
  'background-sd': 'CNR = (S_bg − S_obj) / σ_bg',
  'pooled-sd': 'CNR = (S_bg − S_obj) / √((σ_obj² + σ_bg²)/2)',
};

/** Where a noise SD came from. */
export type NoiseSource =
  'region-sd' | 'sd-about-background-plane' | 'replicate-difference';

/** The mean and spread of a region's signal. */
export interface RegionSignal {
  n: number;
  mean: number;
  sampleSd: number;
}

/** A noise SD with the degrees of freedom of its estimate. */
export interface NoiseMeasure {
  sampleSd: number;
  degreesOfFreedom: number;
  source: NoiseSource;
}

/** Optional refinements of {@link imageFigures}. */
export interface ImageFigureOptions {
  cnrDefinition?: CnrDefinition;
  /** Background noise to use instead of the background region's SD. */
  backgroundNoise?: NoiseMeasure;
  /** Object noise to use in the pooled CNR instead of the object's SD. */
  objectNoise?: NoiseMeasure;
  /**
   * Background signal at the object (e.g. a background plane evaluated at
   * the object's centroid) with its standard error, instead of the
   * background region's mean.
   */
  backgroundLevel?: { value: number; standardError: number };
}

/** How the figures of one image were computed. */
export interface ImageFigureMethod {
  contrast: string;
  cnr: string;
  cnrDefinition: CnrDefinition;
  snr: string;
  noiseSource: NoiseSource;
  backgroundLevel: 'region-mean' | 'background-plane-at-object';
  uncertainty: string;
}

/** Contrast, CNR and SNR of one object/background pair in one image. */
export interface ImageFigures {
  objectSignal: Estimate;
  backgroundSignal: Estimate;
  /** ΔS = S_bg − S_obj. */
  signalDifference: Estimate;
  backgroundNoiseSd: number;
  contrast: Estimate;
  /** CNR by the chosen definition. */
  cnr: Estimate;
  cnrBackgroundSd: Estimate;
  cnrPooled: Estimate;
  snr: Estimate;
  method: ImageFigureMethod;
  warnings: Warning[];
}

/** SE of a sample SD on ν degrees of freedom (normal theory): σ/√(2ν). */
function sdEstimate(noise: NoiseMeasure): Estimate {
  return estimateFromStandardError(
    noise.sampleSd,
    noise.sampleSd / Math.sqrt(2 * noise.degreesOfFreedom),
    null,
    'delta-method',
    1,
  );
}

function meanEstimate(region: RegionSignal): Estimate {
  return estimateFromStandardError(
    region.mean,
    region.sampleSd / Math.sqrt(region.n),
    null,
    'delta-method',
    1,
  );
}

/**
 * Figures of one image from an object region and a background region:
 * C = (S_bg − S_obj)/S_bg, CNR = ΔS/σ_bg (or the pooled form), SNR =
 * S_bg/σ_bg, each with a delta-method standard error from the region SDs and
 * pixel counts (SE of a mean σ/√n, of an SD σ/√(2ν)); this assumes
 * uncorrelated pixel noise, so correlated noise makes it an underestimate —
 * use replicates for the interval that counts.
 * @param object object region statistics (signal units).
 * @param background background region statistics (signal units).
 * @param options CNR definition and noise/level refinements.
 * @throws DomainError('analysis_failed') when the background signal or its
 *   noise is zero, or a region has fewer than 2 pixels.
 * @see PHYSICS.md §3 (figures from paired images); JCGM 100:2008 §5.1.2.
 */
export function imageFigures(
  object: RegionSignal,
  background: RegionSignal,
  options: ImageFigureOptions = {},
): ImageFigures {
  if (object.n < 2 || background.n < 2) {
    throw new DomainError(
      'analysis_failed',
      'Object and background regions each need at least 2 pixels for a noise estimate.',
    );
  }
  const definition = options.cnrDefinition ?? 'background-sd';
  const backgroundNoise = options.backgroundNoise ?? {
    sampleSd: background.sampleSd,
    degreesOfFreedom: background.n - 1,
    source: 'region-sd' as const,
  };
  const objectNoise = options.objectNoise ?? {
    sampleSd: object.sampleSd,
    degreesOfFreedom: object.n - 1,
    source: 'region-sd' as const,
  };
  if (!(backgroundNoise.sampleSd > 0)) {
    throw new DomainError(
      'analysis_failed',
      'The background noise SD is zero, so CNR and SNR are undefined (is the image noise-free or saturated?).',
    );
  }
  const warnings: Warning[] = [];
  const objectSignal = meanEstimate(object);
  const backgroundSignal = options.backgroundLevel
    ? estimateFromStandardError(
        options.backgroundLevel.value,
        options.backgroundLevel.standardError,
        null,
        'delta-method',
        1,
      )
    : meanEstimate(background);
  if (!(backgroundSignal.value > 0)) {
    throw new DomainError(
      'analysis_failed',
      `The background signal is ${backgroundSignal.value}, not positive; contrast is undefined (check the linearisation).`,
    );
  }
  const sigmaBg = sdEstimate(backgroundNoise);
  const sigmaObj = sdEstimate(objectNoise);
  const signalDifference = propagateEstimates(
    (bg, obj) => bg - obj,
    [backgroundSignal, objectSignal],
  );
  if (signalDifference.ci95.low <= 0 && signalDifference.ci95.high >= 0) {
    warnings.push({
      code: 'contrast_not_significant',
      message:
        'The object/background signal difference is not distinguishable from zero; contrast ratios will be unreliable.',
    });
  }
  const contrast = propagateEstimates(
    (bg, obj) => (bg - obj) / bg,
    [backgroundSignal, objectSignal],
  );
  const cnrBackgroundSd = propagateEstimates(
    (bg, obj, sb) => (bg - obj) / sb,
    [backgroundSignal, objectSignal, sigmaBg],
  );
  const cnrPooled = propagateEstimates(
    (bg, obj, sb, so) => (bg - obj) / Math.sqrt((so * so + sb * sb) / 2),
    [backgroundSignal, objectSignal, sigmaBg, sigmaObj],
  );
  const snr = propagateEstimates(
    (bg, sb) => bg / sb,
    [backgroundSignal, sigmaBg],
  );
  return {
    objectSignal,
    backgroundSignal,
    signalDifference,
    backgroundNoiseSd: backgroundNoise.sampleSd,
    contrast,
    cnr: definition === 'pooled-sd' ? cnrPooled : cnrBackgroundSd,
    cnrBackgroundSd,
    cnrPooled,
    snr,
    method: {
      contrast: 'C = (S_bg − S_obj) / S_bg',
      cnr: CNR_FORMULAS[definition],
      cnrDefinition: definition,
      snr: 'SNR = S_bg / σ_bg',
      noiseSource: backgroundNoise.source,
      backgroundLevel: options.backgroundLevel
        ? 'background-plane-at-object'
        : 'region-mean',
      uncertainty:
        'delta method from region SDs and pixel counts (uncorrelated pixel noise assumed)',
    },
    warnings,
  };
}
