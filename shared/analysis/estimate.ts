import { DomainError } from '../errors.ts';
import { coverageFactor95 } from './student-t.ts';

/**
 * How an uncertainty was obtained: the spread of replicate images, the delta
 * method from region SDs and pixel counts of single images, both (a figure
 * propagated from inputs of either kind), or a stated value taken as exact.
 */
export type UncertaintyBasis =
  'replicates' | 'delta-method' | 'mixed' | 'stated';

/**
 * A figure with its standard uncertainty and 95 % confidence interval.
 * `degreesOfFreedom` is null for a large-sample (normal) interval.
 */
export interface Estimate {
  value: number;
  standardError: number;
  degreesOfFreedom: number | null;
  ci95: { low: number; high: number };
  basis: UncertaintyBasis;
  /** Images behind the figure (the smaller side for a two-sided ratio). */
  n: number;
  /** Sample SD across replicate images, when the basis is replicates. */
  replicateSampleSd: number | null;
}

function requireFinite(what: string, value: number): void {
  if (!Number.isFinite(value)) {
    throw new DomainError(
      'analysis_failed',
      `${what} is not a finite number (${value}); check the regions and the signal.`,
    );
  }
}

/**
 * Builds an estimate from a value and its standard error; the interval is
 * value ± t_0.975,ν · SE (ν = ∞ when degreesOfFreedom is null).
 * @throws DomainError('analysis_failed') for a non-finite value or SE.
 */
export function estimateFromStandardError(
  value: number,
  standardError: number,
  degreesOfFreedom: number | null,
  basis: UncertaintyBasis,
  n: number,
): Estimate {
  requireFinite('A figure', value);
  requireFinite('A standard error', standardError);
  const k = coverageFactor95(degreesOfFreedom ?? Infinity);
  return {
    value,
    standardError,
    degreesOfFreedom,
    ci95: { low: value - k * standardError, high: value + k * standardError },
    basis,
    n,
    replicateSampleSd: null,
  };
}

/**
 * Mean of replicate values with its standard error SD/√n and the Student t
 * interval on n − 1 degrees of freedom.
 * @param values one figure per replicate image (n ≥ 2).
 * @throws DomainError('analysis_failed') with fewer than two values.
 * @see any statistics text, e.g. NIST/SEMATECH e-Handbook §7.2.2.1.
 */
export function estimateFromReplicates(values: readonly number[]): Estimate {
  const n = values.length;
  if (n < 2) {
    throw new DomainError(
      'analysis_failed',
      'A replicate interval needs at least two images.',
    );
  }
  let mean = 0;
  for (const value of values) mean += value;
  mean /= n;
  let sumSquares = 0;
  for (const value of values) sumSquares += (value - mean) ** 2;
  const sampleSd = Math.sqrt(sumSquares / (n - 1));
  return {
    ...estimateFromStandardError(
      mean,
      sampleSd / Math.sqrt(n),
      n - 1,
      'replicates',
      n,
    ),
    replicateSampleSd: sampleSd,
  };
}

function combinedBasis(inputs: readonly Estimate[]): UncertaintyBasis {
  const kinds = new Set(
    inputs.map((input) => input.basis).filter((basis) => basis !== 'stated'),
  );
  if (kinds.size === 0) return 'stated';
  return kinds.size === 1 ? [...kinds][0]! : 'mixed';
}

/**
 * A value stated by someone else (e.g. a grid maker's Ts), taken as exact.
 * @throws DomainError('analysis_failed') for a non-finite value.
 */
export function statedEstimate(value: number): Estimate {
  return estimateFromStandardError(value, 0, null, 'stated', 1);
}

/**
 * First-order (delta-method) propagation of independent estimates through a
 * function: SE² = Σ (∂f/∂xᵢ · SEᵢ)², with derivatives by central
 * differences, and the Welch–Satterthwaite effective degrees of freedom
 * ν = SE⁴ / Σ (cᵢ⁴/νᵢ) (inputs with ν = ∞ add nothing to the denominator).
 * @param fn the figure as a function of the input values.
 * @param inputs independent estimates, in fn's argument order.
 * @throws DomainError('analysis_failed') when the result is not finite.
 * @see JCGM 100:2008 (GUM) §5.1.2 and Annex G.4.1 (Welch–Satterthwaite).
 */
export function propagateEstimates(
  fn: (...values: number[]) => number,
  inputs: readonly Estimate[],
): Estimate {
  const values = inputs.map((input) => input.value);
  const value = fn(...values);
  requireFinite('A derived figure', value);
  let variance = 0;
  let dofDenominator = 0;
  let anyFinite = false;
  inputs.forEach((input, i) => {
    if (input.standardError === 0) return;
    const step = Math.max(Math.abs(values[i]!), input.standardError) * 1e-6;
    const up = [...values];
    const down = [...values];
    up[i] = values[i]! + step;
    down[i] = values[i]! - step;
    const derivative = (fn(...up) - fn(...down)) / (2 * step);
    requireFinite('A sensitivity coefficient', derivative);
    const contribution = derivative * input.standardError;
    variance += contribution * contribution;
    if (input.degreesOfFreedom !== null) {
      anyFinite = true;
      dofDenominator += contribution ** 4 / input.degreesOfFreedom;
    }
  });
  const standardError = Math.sqrt(variance);
  const degreesOfFreedom =
    anyFinite && dofDenominator > 0 ? variance ** 2 / dofDenominator : null;
  return estimateFromStandardError(
    value,
    standardError,
    degreesOfFreedom,
    combinedBasis(inputs),
    Math.min(...inputs.map((input) => input.n)),
  );
}

/** Whether a 95 % interval lies wholly above, wholly below or across a value. */
export function intervalRelativeTo(
  estimate: Estimate,
  reference: number,
): 'above' | 'below' | 'includes' {
  if (estimate.ci95.low > reference) return 'above';
  if (estimate.ci95.high < reference) return 'below';
  return 'includes';
}
