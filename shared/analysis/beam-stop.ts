import { DomainError } from '../errors.ts';
import type { Warning } from '../warnings.ts';
import type { Estimate } from './estimate.ts';
import { estimateFromStandardError, propagateEstimates } from './estimate.ts';
import type { RegionSignal } from './image-figures.ts';

/** The signal measured behind one lead disc. */
export interface BeamStopDisc {
  /** Diameter of the lead disc, in mm. */
  diameterMm: number;
  /** Signal of a region inside the disc's shadow. */
  signal: RegionSignal;
}

/** Scatter and primary of one image from a beam-stop series. */
export interface BeamStopFit {
  /** Scatter signal extrapolated to a disc of zero diameter. */
  scatterSignal: Estimate;
  /** Fitted change of the shadow signal per mm of disc diameter. */
  slopePerMm: number;
  /** Open-field (total) signal beside the discs. */
  totalSignal: Estimate;
  /** Total − scatter. */
  primarySignal: Estimate;
  scatterToPrimaryRatio: Estimate;
  scatterFraction: Estimate;
  discs: number;
  method: string;
  warnings: Warning[];
}

function meanOf(signal: RegionSignal): Estimate {
  return estimateFromStandardError(
    signal.mean,
    signal.sampleSd / Math.sqrt(signal.n),
    null,
    'delta-method',
    1,
  );
}

/**
 * Straight line through (diameter, shadow signal) by weighted least squares
 * (weights n/σ², equal weights when some shadow has no noise); returns the
 * intercept, its standard error and the slope. With three or more discs the
 * SE is scaled up by √χ²_red when the points scatter more than their SEs.
 */
function weightedIntercept(discs: readonly BeamStopDisc[]): {
  intercept: number;
  standardError: number;
  slope: number;
} {
  const noiseless = discs.some((d) => !(d.signal.sampleSd > 0));
  const weights = discs.map((d) =>
    noiseless ? 1 : d.signal.n / d.signal.sampleSd ** 2,
  );
  let sw = 0;
  let swx = 0;
  let swxx = 0;
  let swy = 0;
  let swxy = 0;
  discs.forEach((d, i) => {
    const w = weights[i]!;
    sw += w;
    swx += w * d.diameterMm;
    swxx += w * d.diameterMm * d.diameterMm;
    swy += w * d.signal.mean;
    swxy += w * d.diameterMm * d.signal.mean;
  });
  const det = sw * swxx - swx * swx;
  const intercept = (swxx * swy - swx * swxy) / det;
  const slope = (sw * swxy - swx * swy) / det;
  let varianceIntercept = swxx / det;
  if (discs.length >= 3) {
    const chi2 = discs.reduce(
      (s, d, i) =>
        s +
        weights[i]! * (d.signal.mean - intercept - slope * d.diameterMm) ** 2,
      0,
    );
    const reduced = chi2 / (discs.length - 2);
    if (noiseless || reduced > 1) varianceIntercept *= reduced;
  } else if (noiseless) {
    varianceIntercept = 0;
  }
  return { intercept, standardError: Math.sqrt(varianceIntercept), slope };
}

/**
 * Scatter and primary from a beam-stop series: the signal behind lead discs
 * of several diameters is scatter only; it is fitted linearly against the
 * diameter and extrapolated to zero, then P = T − S, SPR = S/P and
 * SF = S/T with T the open-field signal.
 * @param discs shadows of at least one disc (two or more diameters to
 *   extrapolate; one disc, or one diameter, is used as measured with a
 *   warning).
 * @param open the open-field region beside the discs.
 * @throws DomainError('analysis_failed') without discs, or when the scatter
 *   is not below the open-field signal.
 * @see PHYSICS.md §3 (beam-stop method); Boone & Cooper, Med Phys
 *   2000;27:1818 on its limits.
 */
export function fitBeamStop(
  discs: readonly BeamStopDisc[],
  open: RegionSignal,
): BeamStopFit {
  if (discs.length === 0) {
    throw new DomainError(
      'analysis_failed',
      'A beam-stop series needs at least one lead disc region.',
    );
  }
  const warnings: Warning[] = [];
  const diameters = new Set(discs.map((d) => d.diameterMm));
  let scatterSignal: Estimate;
  let slopePerMm = 0;
  let method: string;
  if (diameters.size < 2) {
    const pooledN = discs.reduce((s, d) => s + d.signal.n, 0);
    const mean =
      discs.reduce((s, d) => s + d.signal.mean * d.signal.n, 0) / pooledN;
    const variance = discs.reduce(
      (s, d) => s + (d.signal.sampleSd ** 2 * d.signal.n) / pooledN,
      0,
    );
    scatterSignal = meanOf({ n: pooledN, mean, sampleSd: Math.sqrt(variance) });
    method = 'scatter taken behind discs of one diameter, not extrapolated';
    warnings.push({
      code: 'beam_stop_not_extrapolated',
      message:
        'All lead discs have the same diameter, so the scatter was not extrapolated to zero diameter and is slightly underestimated.',
    });
  } else {
    const fit = weightedIntercept(discs);
    scatterSignal = estimateFromStandardError(
      fit.intercept,
      fit.standardError,
      null,
      'delta-method',
      1,
    );
    slopePerMm = fit.slope;
    method = `shadow signal fitted linearly against disc diameter (${discs.length} discs, weighted least squares) and extrapolated to zero`;
  }
  const totalSignal = meanOf(open);
  if (!(scatterSignal.value < totalSignal.value && scatterSignal.value > 0)) {
    throw new DomainError(
      'analysis_failed',
      `The scatter behind the discs (${scatterSignal.value.toPrecision(4)}) must lie between 0 and the open-field signal (${totalSignal.value.toPrecision(4)}).`,
    );
  }
  return {
    scatterSignal,
    slopePerMm,
    totalSignal,
    primarySignal: propagateEstimates(
      (t, s) => t - s,
      [totalSignal, scatterSignal],
    ),
    scatterToPrimaryRatio: propagateEstimates(
      (t, s) => s / (t - s),
      [totalSignal, scatterSignal],
    ),
    scatterFraction: propagateEstimates(
      (t, s) => s / t,
      [totalSignal, scatterSignal],
    ),
    discs: discs.length,
    method,
    warnings,
  };
}
