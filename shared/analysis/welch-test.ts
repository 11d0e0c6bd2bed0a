import { DomainError } from '../errors.ts';
import { studentTCdf, coverageFactor95 } from './student-t.ts';

/** Result of Welch's unequal-variance t-test of mean(a) − mean(b). */
export interface WelchTestResult {
  meanDifference: number;
  standardError: number;
  t: number;
  /** Welch–Satterthwaite degrees of freedom (not an integer in general). */
  degreesOfFreedom: number;
  /** Two-sided p-value for a zero difference. */
  pTwoSided: number;
  ci95: { low: number; high: number };
  nA: number;
  nB: number;
}

function meanAndSampleVariance(values: readonly number[]): [number, number] {
  let mean = 0;
  for (const value of values) mean += value;
  mean /= values.length;
  let sumSquares = 0;
  for (const value of values) sumSquares += (value - mean) ** 2;
  return [mean, sumSquares / (values.length - 1)];
}

/**
 * Welch's t-test: t = (x̄a − x̄b)/√(sa²/na + sb²/nb), ν from the
 * Welch–Satterthwaite equation, two-sided p from Student's t.
 * @param a replicate values of the first group (≥ 2).
 * @param b replicate values of the second group (≥ 2).
 * @throws DomainError('analysis_failed') when a group has fewer than two
 *   values or both groups have zero spread.
 * @see Welch, Biometrika 1947;34:28–35; NIST/SEMATECH e-Handbook §1.3.5.3.
 */
export function welchTTest(
  a: readonly number[],
  b: readonly number[],
): WelchTestResult {
  if (a.length < 2 || b.length < 2) {
    throw new DomainError(
      'analysis_failed',
      "Welch's t-test needs at least two replicates on each side.",
    );
  }
  const [meanA, varA] = meanAndSampleVariance(a);
  const [meanB, varB] = meanAndSampleVariance(b);
  const termA = varA / a.length;
  const termB = varB / b.length;
  const variance = termA + termB;
  if (!(variance > 0)) {
    throw new DomainError(
      'analysis_failed',
      "Welch's t-test is undefined when neither group varies.",
    );
  }
  const standardError = Math.sqrt(variance);
  const meanDifference = meanA - meanB;
  const t = meanDifference / standardError;
  const degreesOfFreedom =
    (variance * variance) /
    ((termA * termA) / (a.length - 1) + (termB * termB) / (b.length - 1));
  const pTwoSided = 2 * studentTCdf(-Math.abs(t), degreesOfFreedom);
  const k = coverageFactor95(degreesOfFreedom);
  return {
    meanDifference,
    standardError,
    t,
    degreesOfFreedom,
    pTwoSided,
    ci95: {
      low: meanDifference - k * standardError,
      high: meanDifference + k * standardError,
    },
    nA: a.length,
    nB: b.length,
  };
}
