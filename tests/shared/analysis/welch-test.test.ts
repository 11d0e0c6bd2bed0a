import { tTestTwoSample } from 'simple-statistics';
import { describe, expect, it } from 'vitest';
import { welchTTest } from '../../../shared/analysis/welch-test.ts';
import {
  requireReferencePython,
  runReferenceScript,
} from '../../helpers/dicom-reference-python.ts';

describe("Welch's t-test", () => {
  it('equals the pooled two-sample t of simple-statistics when n is equal', () => {
    const a = [4.1, 5.2, 6.3, 5.0, 4.8, 5.9];
    const b = [3.2, 4.0, 3.9, 4.4, 3.1, 3.6];

    const result = welchTTest(a, b);

    // simple-statistics tTestTwoSample (pooled variance); with na = nb the
    // Welch statistic is algebraically the same number.
    expect(result.t).toBeCloseTo(tTestTwoSample(a, b, 0)!, 12);
  });

  it('agrees with numpy on t and the Welch–Satterthwaite ν for unequal groups', () => {
    requireReferencePython(['numpy']);
    const cases = [
      {
        a: [12.1, 13.4, 11.8, 12.9, 14.2],
        b: [10.2, 10.9, 11.4, 9.8, 10.1, 10.7, 11.0, 9.9],
      },
      { a: [1.02, 0.98, 1.05], b: [0.91, 1.2, 0.8, 1.1] },
    ];

    const reference = runReferenceScript<{
      welch: Array<{ t: number; degreesOfFreedom: number }>;
    }>('numpy_analysis.py', [], { welch: cases });

    cases.forEach((c, i) => {
      const result = welchTTest(c.a, c.b);
      // tests/reference/numpy_analysis.py (numpy var, ddof = 1).
      expect(result.t).toBeCloseTo(reference.welch[i]!.t, 10);
      expect(result.degreesOfFreedom).toBeCloseTo(
        reference.welch[i]!.degreesOfFreedom,
        10,
      );
    });
  });

  it('uses the t quantile on the Welch ν for its interval and p = 1 at t = 0', () => {
    const a = [0.5, -0.5, 0.5, -0.5, 0.5, -0.5];
    const b = [0.25, -0.25, 0.25, -0.25, 0.25, -0.25];

    const result = welchTTest(a, b);

    expect(result.t).toBeCloseTo(0, 12);
    expect(result.pTwoSided).toBeCloseTo(1, 10);
    // ν = (va + vb)² / (va²/5 + vb²/5) with vb = va/4 gives 5·(1.25²)/(1 + 1/16) = 7.35.
    expect(result.degreesOfFreedom).toBeCloseTo(
      (5 * 1.25 ** 2) / (1 + 1 / 16),
      10,
    );
    // NIST/SEMATECH e-Handbook §1.3.6.7.2: t_0.975 lies between 2.365 (ν 7)
    // and 2.306 (ν 8).
    const k = (result.ci95.high - result.meanDifference) / result.standardError;
    expect(k).toBeLessThan(2.365);
    expect(k).toBeGreaterThan(2.306);
  });

  it('refuses groups of fewer than two and groups without spread', () => {
    expect(() => welchTTest([1], [1, 2])).toThrow(
      expect.objectContaining({ code: 'analysis_failed' }),
    );
    expect(() => welchTTest([1, 1], [2, 2])).toThrow(
      expect.objectContaining({ code: 'analysis_failed' }),
    );
  });
});
