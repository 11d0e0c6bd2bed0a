import { describe, expect, it } from 'vitest';
import {
  coverageFactor95,
  normalCdf,
  normalQuantile,
  studentTCdf,
  studentTQuantile,
} from '../../../shared/analysis/student-t.ts';

// NIST/SEMATECH e-Handbook of Statistical Methods, §1.3.6.7.2 "Critical
// values of the Student's t distribution" (upper-tail probabilities, three
// decimals as printed there).
const NIST_T_TABLE: Array<[number, number, number]> = [
  // [ν, upper-tail probability α, t such that P(T > t) = α]
  [1, 0.025, 12.706],
  [2, 0.025, 4.303],
  [3, 0.025, 3.182],
  [4, 0.025, 2.776],
  [5, 0.025, 2.571],
  [10, 0.025, 2.228],
  [20, 0.025, 2.086],
  [30, 0.025, 2.042],
  [100, 0.025, 1.984],
  [1, 0.05, 6.314],
  [5, 0.05, 2.015],
  [10, 0.05, 1.812],
  [1, 0.005, 63.657],
  [10, 0.005, 3.169],
  [10, 0.1, 1.372],
];

describe("Student's t quantile and distribution", () => {
  it.each(NIST_T_TABLE)(
    'matches the NIST table for ν = %d, upper tail %f',
    (nu, alpha, t) => {
      // NIST/SEMATECH e-Handbook §1.3.6.7.2, printed to 3 decimals.
      expect(studentTQuantile(1 - alpha, nu)).toBeCloseTo(t, 3);
      expect(1 - studentTCdf(t, nu)).toBeCloseTo(alpha, 4);
    },
  );

  it('gives the normal 1.960 for infinite degrees of freedom', () => {
    // NIST/SEMATECH e-Handbook §1.3.6.7.2, row ∞: 1.960.
    expect(coverageFactor95(Infinity)).toBeCloseTo(1.96, 3);
    expect(studentTCdf(1.959964, Infinity)).toBeCloseTo(0.975, 6);
  });

  it('is symmetric, continuous in ν and inverts its own distribution', () => {
    for (const nu of [1.5, 3.7, 12.25, 250]) {
      for (const p of [0.01, 0.3, 0.5, 0.9, 0.999]) {
        const t = studentTQuantile(p, nu);
        expect(studentTCdf(t, nu)).toBeCloseTo(p, 10);
        expect(studentTQuantile(1 - p, nu)).toBeCloseTo(-t, 9);
      }
    }
    expect(coverageFactor95(4.5)).toBeLessThan(coverageFactor95(4));
    expect(coverageFactor95(4.5)).toBeGreaterThan(coverageFactor95(5));
  });

  it('rejects p outside (0, 1) and non-positive degrees of freedom', () => {
    expect(() => studentTQuantile(1, 5)).toThrow(
      expect.objectContaining({ code: 'analysis_failed' }),
    );
    expect(() => studentTQuantile(0.5, 0)).toThrow(
      expect.objectContaining({ code: 'analysis_failed' }),
    );
    expect(() => studentTCdf(Number.NaN, 3)).toThrow(
      expect.objectContaining({ code: 'analysis_failed' }),
    );
  });
});

describe('normal distribution', () => {
  it.each([
    [0.975, 1.959964],
    [0.95, 1.644854],
    [0.995, 2.575829],
    [0.5, 0],
  ])('has the quantile z_%f = %f', (p, z) => {
    // NIST/SEMATECH e-Handbook §1.3.6.7.1 gives 1.645, 1.960, 2.576; the
    // 6-decimal values are from memory.
    expect(normalQuantile(p)).toBeCloseTo(z, 6);
    expect(normalCdf(z)).toBeCloseTo(p, 7);
  });
});
