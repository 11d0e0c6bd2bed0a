import { DomainError } from '../errors.ts';

/**
 * Exposure index EI and deviation index DI of digital radiography detectors.
 * @see IEC 62494-1:2008; AAPM TG-116 (2009); PHYSICS.md §4.
 */

/** EI per µGy of detector air kerma under RQA5 calibration conditions. */
export const EXPOSURE_INDEX_PER_UGY = 100; // IEC 62494-1:2008: EI = 100 at 1 µGy

/**
 * Deviation index DI = 10·log10(EI / EI_T).
 * @param exposureIndex EI (dimensionless, > 0).
 * @param targetExposureIndex EI_T (> 0).
 * @throws DomainError('analysis_failed') when either index is not positive.
 * @see IEC 62494-1:2008.
 */
export function deviationIndex(
  exposureIndex: number,
  targetExposureIndex: number,
): number {
  if (!(exposureIndex > 0 && targetExposureIndex > 0)) {
    throw new DomainError(
      'analysis_failed',
      `Exposure index and target must be positive (got ${exposureIndex} and ${targetExposureIndex}).`,
    );
  }
  return 10 * Math.log10(exposureIndex / targetExposureIndex);
}

/**
 * Detector exposure relative to the target implied by a deviation index,
 * EI / EI_T = 10^(DI/10).
 * @see IEC 62494-1:2008.
 */
export function exposureRatioFromDeviationIndex(deviation: number): number {
  if (!Number.isFinite(deviation)) {
    throw new DomainError(
      'analysis_failed',
      `Deviation index must be finite, got ${deviation}.`,
    );
  }
  return 10 ** (deviation / 10);
}

/**
 * Exposure index for a detector air kerma, EI = 100 · K / µGy (valid for the
 * RQA5 beam the index is calibrated in).
 * @param airKermaUgy detector air kerma in µGy (≥ 0).
 * @see IEC 62494-1:2008.
 */
export function exposureIndexFromAirKerma(airKermaUgy: number): number {
  if (!(airKermaUgy >= 0) || !Number.isFinite(airKermaUgy)) {
    throw new DomainError(
      'analysis_failed',
      `Air kerma must be a non-negative number of µGy, got ${airKermaUgy}.`,
    );
  }
  return EXPOSURE_INDEX_PER_UGY * airKermaUgy;
}
