import { DomainError } from '../errors.ts';
import type { SignalLookupTable } from '../roi/region-statistics.ts';

/**
 * Detector conversion function: mean pixel value PV against detector air
 * kerma K (µGy) from flat-field exposures, and its inverse, which turns
 * stored values into a signal proportional to air kerma.
 * @see IEC 62220-1-1:2015 (linearisation from flat fields); model forms as in
 *   PHYSICS.md §4 (linear, logarithmic; power added here).
 */

/** Model of PV(K). */
export type CalibrationModel = 'linear' | 'logarithmic' | 'power';

/** One flat-field point. */
export interface CalibrationPoint {
  /** Detector air kerma in µGy (> 0 for the logarithmic and power models). */
  airKermaUgy: number;
  /** Mean pixel value of the flat field (stored values). */
  meanPixelValue: number;
}

/** A fitted conversion function. */
export interface CalibrationFit {
  model: CalibrationModel;
  /**
   * linear: PV = a + b·K; logarithmic: PV = a + b·ln(K / 1 µGy);
   * power: PV = a·(K / 1 µGy)^b.
   */
  a: number;
  b: number;
  /** 1 − SS_res/SS_tot, residuals in pixel values. */
  rSquared: number;
  /** Measured − fitted PV, in point order. */
  residuals: number[];
  /** √(SS_res/(n − 2)), in pixel values. */
  residualSd: number;
}

/** All three fits and the one chosen. */
export interface CalibrationResult {
  fits: CalibrationFit[];
  chosen: CalibrationFit;
  /** 'requested' when the caller named the model, else 'best R²'. */
  choice: 'requested' | 'best R²';
}

/**
 * Pixel value PV(K) of a fitted model at detector air kerma K:
 * linear a + b·K; logarithmic a + b·ln(K / 1 µGy); power a·(K / 1 µGy)^b.
 * @param airKermaUgy detector air kerma in µGy (> 0 for logarithmic and power).
 * @returns the mean pixel value (stored values); NaN or ±Infinity where the
 *   model is undefined (K ≤ 0 for logarithmic, K < 0 with a fractional power).
 * @see PHYSICS.md §4 (model forms).
 */
export function calibrationForward(
  fit: Pick<CalibrationFit, 'model' | 'a' | 'b'>,
  airKermaUgy: number,
): number {
  switch (fit.model) {
    case 'linear':
      return fit.a + fit.b * airKermaUgy;
    case 'logarithmic':
      return fit.a + fit.b * Math.log(airKermaUgy);
    case 'power':
      return fit.a * airKermaUgy ** fit.b;
  }
}

/** Ordinary least squares of y on x: [intercept, slope]. */
function straightLine(x: number[], y: number[]): [number, number] {
  const n = x.length;
  const mx = x.reduce((s, v) => s + v, 0) / n;
  const my = y.reduce((s, v) => s + v, 0) / n;
  let sxx = 0;
  let sxy = 0;
  for (let i = 0; i < n; i += 1) {
    sxx += (x[i]! - mx) ** 2;
    sxy += (x[i]! - mx) * (y[i]! - my);
  }
  const slope = sxy / sxx;
  return [my - slope * mx, slope];
}

function describe(
  model: CalibrationModel,
  a: number,
  b: number,
  points: readonly CalibrationPoint[],
): CalibrationFit {
  const residuals = points.map(
    (p) =>
      p.meanPixelValue - calibrationForward({ model, a, b }, p.airKermaUgy),
  );
  const mean = points.reduce((s, p) => s + p.meanPixelValue, 0) / points.length;
  const ssTot = points.reduce((s, p) => s + (p.meanPixelValue - mean) ** 2, 0);
  const ssRes = residuals.reduce((s, r) => s + r * r, 0);
  return {
    model,
    a,
    b,
    rSquared: 1 - ssRes / ssTot,
    residuals,
    residualSd: Math.sqrt(ssRes / (points.length - 2)),
  };
}

/**
 * Power law fitted by least squares in pixel values: a log–log straight
 * line gives the start, then Gauss–Newton steps (halved while they do not
 * lower the residual sum) minimise Σ(PV − a·K^b)².
 */
function fitPower(points: readonly CalibrationPoint[]): [number, number] {
  const lnK = points.map((p) => Math.log(p.airKermaUgy));
  const lnPv = points.map((p) => Math.log(p.meanPixelValue));
  const [lnA, b0] = straightLine(lnK, lnPv);
  let a = Math.exp(lnA);
  let b = b0;
  const ss = (aa: number, bb: number): number =>
    points.reduce(
      (s, p) => s + (p.meanPixelValue - aa * p.airKermaUgy ** bb) ** 2,
      0,
    );
  let current = ss(a, b);
  for (let iteration = 0; iteration < 100; iteration += 1) {
    // J columns: ∂f/∂a = K^b, ∂f/∂b = a·K^b·ln K.
    let jaa = 0;
    let jab = 0;
    let jbb = 0;
    let ga = 0;
    let gb = 0;
    points.forEach((p, i) => {
      const kb = p.airKermaUgy ** b;
      const da = kb;
      const db = a * kb * lnK[i]!;
      const r = p.meanPixelValue - a * kb;
      jaa += da * da;
      jab += da * db;
      jbb += db * db;
      ga += da * r;
      gb += db * r;
    });
    const det = jaa * jbb - jab * jab;
    if (!(Math.abs(det) > 0)) break;
    let stepA = (jbb * ga - jab * gb) / det;
    let stepB = (jaa * gb - jab * ga) / det;
    let accepted = false;
    for (let halving = 0; halving < 30; halving += 1) {
      const trial = ss(a + stepA, b + stepB);
      if (trial <= current) {
        a += stepA;
        b += stepB;
        accepted = current - trial > 1e-15 * current;
        current = trial;
        break;
      }
      stepA /= 2;
      stepB /= 2;
    }
    if (!accepted) break;
  }
  return [a, b];
}

function checkPoints(points: readonly CalibrationPoint[]): void {
  if (points.length < 3) {
    throw new DomainError(
      'validation_failed',
      'A detector calibration needs at least 3 flat-field points.',
    );
  }
  for (const p of points) {
    if (!(
      Number.isFinite(p.airKermaUgy) && Number.isFinite(p.meanPixelValue)
    )) {
      throw new DomainError(
        'validation_failed',
        'Every calibration point needs a finite air kerma and pixel value.',
      );
    }
  }
  if (new Set(points.map((p) => p.airKermaUgy)).size < 2) {
    throw new DomainError(
      'validation_failed',
      'The calibration points must span at least two air kerma values.',
    );
  }
}

/**
 * Fits the linear, logarithmic and power conversion functions by least
 * squares (residuals in pixel values) and chooses one: the requested model,
 * or the highest R² (all have two parameters, so this is also the smallest
 * residual SD). Models that need K > 0 (and PV > 0 for power) are left out
 * when a point breaks that.
 * @param points flat-field points (≥ 3, at least two distinct kerma values).
 * @param model the model to use; omitted → best R².
 * @throws DomainError('validation_failed') for too few or invalid points, or
 *   a requested model the points cannot support.
 * @see IEC 62220-1-1:2015 §5 (conversion function).
 */
export function fitDetectorCalibration(
  points: readonly CalibrationPoint[],
  model?: CalibrationModel,
): CalibrationResult {
  checkPoints(points);
  const fits: CalibrationFit[] = [];
  const [la, lb] = straightLine(
    points.map((p) => p.airKermaUgy),
    points.map((p) => p.meanPixelValue),
  );
  fits.push(describe('linear', la, lb, points));
  if (points.every((p) => p.airKermaUgy > 0)) {
    const [ga, gb] = straightLine(
      points.map((p) => Math.log(p.airKermaUgy)),
      points.map((p) => p.meanPixelValue),
    );
    fits.push(describe('logarithmic', ga, gb, points));
    if (points.every((p) => p.meanPixelValue > 0)) {
      const [pa, pb] = fitPower(points);
      fits.push(describe('power', pa, pb, points));
    }
  }
  if (model) {
    const requested = fits.find((fit) => fit.model === model);
    if (!requested) {
      throw new DomainError(
        'validation_failed',
        `The ${model} model needs positive air kerma${model === 'power' ? ' and pixel values' : ''} at every point.`,
      );
    }
    return { fits, chosen: requested, choice: 'requested' };
  }
  const chosen = fits.reduce((best, fit) =>
    fit.rSquared > best.rSquared ? fit : best,
  );
  return { fits, chosen, choice: 'best R²' };
}

/**
 * Air kerma (µGy) for a pixel value by the inverse of a fitted model:
 * linear K = (PV − a)/b; logarithmic K = exp((PV − a)/b);
 * power K = (PV/a)^(1/b), 0 where PV/a ≤ 0.
 * @throws DomainError('analysis_failed') when the slope is zero.
 */
export function airKermaFromPixelValue(
  fit: CalibrationFit,
  pixelValue: number,
): number {
  if (
    !(Math.abs(fit.b) > 0) ||
    !(Math.abs(fit.a) > 0 || fit.model !== 'power')
  ) {
    throw new DomainError(
      'analysis_failed',
      'The calibration has a zero slope, so it cannot be inverted.',
    );
  }
  switch (fit.model) {
    case 'linear':
      return (pixelValue - fit.a) / fit.b;
    case 'logarithmic':
      return Math.exp((pixelValue - fit.a) / fit.b);
    case 'power': {
      const ratio = pixelValue / fit.a;
      return ratio > 0 ? ratio ** (1 / fit.b) : 0;
    }
  }
}

/**
 * Lookup table of air kerma (µGy) for every stored value in [minValue,
 * maxValue], for regionStatistics and the other span functions
 * (signal = table[value + offset]). A value whose inverse overflows keeps
 * Infinity in the table, so measuring a region that contains it fails loudly
 * instead of giving a number.
 * @param minValue smallest stored value (e.g. 0 or −32768).
 * @param maxValue largest stored value (e.g. 2^BitsStored − 1).
 * @throws DomainError('analysis_failed') for an empty or over-large range.
 */
export function calibrationLookupTable(
  fit: CalibrationFit,
  minValue: number,
  maxValue: number,
): SignalLookupTable {
  const size = maxValue - minValue + 1;
  if (!(Number.isInteger(size) && size > 0 && size <= 1 << 24)) {
    throw new DomainError(
      'analysis_failed',
      `A lookup table cannot cover the values ${minValue}..${maxValue}.`,
    );
  }
  const table = new Float64Array(size);
  for (let i = 0; i < size; i += 1) {
    table[i] = airKermaFromPixelValue(fit, minValue + i);
  }
  return { table, offset: -minValue };
}
