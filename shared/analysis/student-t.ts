import { gammaln, probit } from 'simple-statistics';
import { DomainError } from '../errors.ts';

/**
 * Student's t distribution: cumulative probability and quantile, for any
 * positive (also non-integer, as Welch–Satterthwaite gives) degrees of
 * freedom, and the normal distribution they tend to. simple-statistics has
 * log-gamma but no t quantile, and its probit and erf are good to only about
 * 1e-3 and 1e-7, so it serves here for starting values only.
 *
 * @see Abramowitz & Stegun, Handbook of Mathematical Functions (1964),
 *   26.5.27 (t from the incomplete beta function), 26.5.8 (its continued
 *   fraction), 26.2.30/6.5 (normal from the incomplete gamma function),
 *   evaluated as in Press et al., Numerical Recipes, 3rd ed., §6.2 and §6.4
 *   (series and modified Lentz continued fractions).
 */

const CONTINUED_FRACTION_EPSILON = 1e-15;
const CONTINUED_FRACTION_MAX_TERMS = 500;
const TINY = 1e-300;

/** Continued fraction of the incomplete beta function I_x(a, b). */
function betaContinuedFraction(a: number, b: number, x: number): number {
  const qab = a + b;
  const qap = a + 1;
  const qam = a - 1;
  let c = 1;
  let d = 1 - (qab * x) / qap;
  if (Math.abs(d) < TINY) d = TINY;
  d = 1 / d;
  let h = d;
  for (let m = 1; m <= CONTINUED_FRACTION_MAX_TERMS; m += 1) {
    const m2 = 2 * m;
    let aa = (m * (b - m) * x) / ((qam + m2) * (a + m2));
    d = 1 + aa * d;
    if (Math.abs(d) < TINY) d = TINY;
    c = 1 + aa / c;
    if (Math.abs(c) < TINY) c = TINY;
    d = 1 / d;
    h *= d * c;
    aa = (-(a + m) * (qab + m) * x) / ((a + m2) * (qap + m2));
    d = 1 + aa * d;
    if (Math.abs(d) < TINY) d = TINY;
    c = 1 + aa / c;
    if (Math.abs(c) < TINY) c = TINY;
    d = 1 / d;
    const delta = d * c;
    h *= delta;
    if (Math.abs(delta - 1) < CONTINUED_FRACTION_EPSILON) return h;
  }
  return h;
}

/** Regularised incomplete beta function I_x(a, b), 0 ≤ x ≤ 1. */
function regularisedIncompleteBeta(x: number, a: number, b: number): number {
  if (x <= 0) return 0;
  if (x >= 1) return 1;
  const logFront =
    gammaln(a + b) -
    gammaln(a) -
    gammaln(b) +
    a * Math.log(x) +
    b * Math.log(1 - x);
  const front = Math.exp(logFront);
  // The continued fraction converges fast only below (a+1)/(a+b+2); use the
  // symmetry I_x(a,b) = 1 − I_{1−x}(b,a) above it.
  if (x < (a + 1) / (a + b + 2)) {
    return (front * betaContinuedFraction(a, b, x)) / a;
  }
  return 1 - (front * betaContinuedFraction(b, a, 1 - x)) / b;
}

/** Regularised upper incomplete gamma function Q(a, x), x ≥ 0. */
function regularisedUpperGamma(a: number, x: number): number {
  if (x <= 0) return 1;
  const logFront = -x + a * Math.log(x) - gammaln(a);
  if (x < a + 1) {
    let term = 1 / a;
    let sum = term;
    for (let n = 1; n < CONTINUED_FRACTION_MAX_TERMS; n += 1) {
      term *= x / (a + n);
      sum += term;
      if (Math.abs(term) < Math.abs(sum) * CONTINUED_FRACTION_EPSILON) break;
    }
    return 1 - sum * Math.exp(logFront);
  }
  let b = x + 1 - a;
  let c = 1 / TINY;
  let d = 1 / b;
  let h = d;
  for (let i = 1; i < CONTINUED_FRACTION_MAX_TERMS; i += 1) {
    const an = -i * (i - a);
    b += 2;
    d = an * d + b;
    if (Math.abs(d) < TINY) d = TINY;
    c = b + an / c;
    if (Math.abs(c) < TINY) c = TINY;
    d = 1 / d;
    const delta = d * c;
    h *= delta;
    if (Math.abs(delta - 1) < CONTINUED_FRACTION_EPSILON) break;
  }
  return Math.exp(logFront) * h;
}

/**
 * Standard normal cumulative probability Φ(z) = ½·erfc(−z/√2), with erfc
 * from the incomplete gamma function: erfc(x) = Q(½, x²) for x ≥ 0.
 * @see Abramowitz & Stegun 26.2.30 and 6.5.17.
 */
export function normalCdf(z: number): number {
  if (Number.isNaN(z)) {
    throw new DomainError('analysis_failed', 'z must be a number.');
  }
  const upper = 0.5 * regularisedUpperGamma(0.5, (z * z) / 2);
  return z >= 0 ? 1 - upper : upper;
}

/**
 * Standard normal quantile: Newton steps on {@link normalCdf} from
 * simple-statistics' probit as the start.
 * @throws DomainError('analysis_failed') for p outside (0, 1).
 */
export function normalQuantile(probability: number): number {
  if (!(probability > 0 && probability < 1)) {
    throw new DomainError(
      'analysis_failed',
      `A quantile needs 0 < p < 1, got ${probability}.`,
    );
  }
  let z = probit(probability);
  for (let i = 0; i < 50; i += 1) {
    const density = Math.exp(-0.5 * z * z) / Math.sqrt(2 * Math.PI);
    const step = (normalCdf(z) - probability) / density;
    z -= step;
    if (Math.abs(step) <= 1e-15 * Math.max(1, Math.abs(z))) break;
  }
  return z;
}

function requireDegreesOfFreedom(degreesOfFreedom: number): void {
  if (!(degreesOfFreedom > 0)) {
    throw new DomainError(
      'analysis_failed',
      `Degrees of freedom must be positive, got ${degreesOfFreedom}.`,
    );
  }
}

/**
 * Cumulative probability P(T ≤ t) of Student's t with ν degrees of freedom;
 * ν = Infinity gives the standard normal.
 * @throws DomainError('analysis_failed') when ν is not positive.
 * @see Abramowitz & Stegun 26.5.27.
 */
export function studentTCdf(t: number, degreesOfFreedom: number): number {
  requireDegreesOfFreedom(degreesOfFreedom);
  if (Number.isNaN(t)) {
    throw new DomainError('analysis_failed', 't must be a number.');
  }
  if (degreesOfFreedom === Infinity) {
    return normalCdf(t);
  }
  const x = degreesOfFreedom / (degreesOfFreedom + t * t);
  const tail = 0.5 * regularisedIncompleteBeta(x, degreesOfFreedom / 2, 0.5);
  return t > 0 ? 1 - tail : tail;
}

/** Probability density of Student's t with ν degrees of freedom. */
function studentTDensity(t: number, degreesOfFreedom: number): number {
  const v = degreesOfFreedom;
  return Math.exp(
    gammaln((v + 1) / 2) -
      gammaln(v / 2) -
      0.5 * Math.log(v * Math.PI) -
      ((v + 1) / 2) * Math.log1p((t * t) / v),
  );
}

/**
 * Quantile t_p,ν of Student's t: the t with P(T ≤ t) = p. ν = Infinity gives
 * the normal quantile.
 * @param probability p, 0 < p < 1.
 * @param degreesOfFreedom ν > 0, not necessarily an integer.
 * @throws DomainError('analysis_failed') for p outside (0, 1) or ν ≤ 0.
 * @see Abramowitz & Stegun 26.5.27, inverted by safeguarded Newton steps.
 */
export function studentTQuantile(
  probability: number,
  degreesOfFreedom: number,
): number {
  requireDegreesOfFreedom(degreesOfFreedom);
  if (!(probability > 0 && probability < 1)) {
    throw new DomainError(
      'analysis_failed',
      `A quantile needs 0 < p < 1, got ${probability}.`,
    );
  }
  if (degreesOfFreedom === Infinity) return normalQuantile(probability);
  if (probability === 0.5) return 0;
  if (probability < 0.5) {
    return -studentTQuantile(1 - probability, degreesOfFreedom);
  }
  // Bracket [0, hi] then Newton steps kept inside the bracket.
  let lo = 0;
  let hi = Math.max(1, probit(probability));
  while (studentTCdf(hi, degreesOfFreedom) < probability) {
    lo = hi;
    hi *= 2;
  }
  let t = (lo + hi) / 2;
  for (let i = 0; i < 200; i += 1) {
    const error = studentTCdf(t, degreesOfFreedom) - probability;
    if (error > 0) hi = t;
    else lo = t;
    const step = error / studentTDensity(t, degreesOfFreedom);
    let next = t - step;
    if (!(next > lo && next < hi)) next = (lo + hi) / 2;
    if (Math.abs(next - t) <= 1e-14 * Math.max(1, Math.abs(t))) return next;
    t = next;
  }
  return t;
}

/**
 * Two-sided 95 % coverage factor: t_0.975,ν (1.96 for ν = ∞).
 * @see studentTQuantile.
 */
export function coverageFactor95(degreesOfFreedom: number): number {
  return studentTQuantile(0.975, degreesOfFreedom);
}
