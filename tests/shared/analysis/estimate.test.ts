import { mean, sampleStandardDeviation } from 'simple-statistics';
import { describe, expect, it } from 'vitest';
import {
  estimateFromReplicates,
  estimateFromStandardError,
  intervalRelativeTo,
  propagateEstimates,
  statedEstimate,
} from '../../../shared/analysis/estimate.ts';
import { createSeededRandom } from '../../../server/synthetic/seeded-random.ts';

describe('estimates and their propagation', () => {
  it('gives the replicate mean, SD and Student t interval', () => {
    const values = [1.9, 2.1, 2.0, 2.2, 1.8];

    const estimate = estimateFromReplicates(values);

    // simple-statistics mean and sample SD.
    expect(estimate.value).toBeCloseTo(mean(values), 12);
    expect(estimate.replicateSampleSd).toBeCloseTo(
      sampleStandardDeviation(values),
      12,
    );
    expect(estimate.degreesOfFreedom).toBe(4);
    // NIST/SEMATECH e-Handbook §1.3.6.7.2: t_0.975,4 = 2.776.
    expect(estimate.ci95.high - estimate.value).toBeCloseTo(
      (2.776 * sampleStandardDeviation(values)) / Math.sqrt(5),
      3,
    );
    expect(estimate.basis).toBe('replicates');
  });

  it('propagates a ratio as the sum of relative variances', () => {
    const a = estimateFromStandardError(10, 0.3, null, 'delta-method', 1);
    const b = estimateFromStandardError(4, 0.2, null, 'delta-method', 1);

    const ratio = propagateEstimates((x, y) => x / y, [a, b]);

    expect(ratio.value).toBe(2.5);
    expect(ratio.standardError).toBeCloseTo(
      2.5 * Math.sqrt(0.03 ** 2 + 0.05 ** 2),
      9,
    );
    expect(ratio.degreesOfFreedom).toBeNull();
    // NIST/SEMATECH e-Handbook §1.3.6.7.1: z_0.975 = 1.960.
    expect(ratio.ci95.low).toBeCloseTo(2.5 - 1.96 * ratio.standardError, 3);
  });

  it('agrees with a bootstrap of replicates for the SE of a ratio of means', () => {
    const random = createSeededRandom(2024);
    const a = Array.from({ length: 30 }, () => 10 + random.normal());
    const b = Array.from({ length: 25 }, () => 5 + 0.8 * random.normal());

    const propagated = propagateEstimates(
      (x, y) => x / y,
      [estimateFromReplicates(a), estimateFromReplicates(b)],
    );
    const ratios: number[] = [];
    for (let i = 0; i < 4000; i += 1) {
      const resampleA = a.map(
        () => a[Math.floor(random.uniform() * a.length)]!,
      );
      const resampleB = b.map(
        () => b[Math.floor(random.uniform() * b.length)]!,
      );
      ratios.push(mean(resampleA) / mean(resampleB));
    }
    // The bootstrap divides by n where the SE uses n − 1; undo that bias.
    const bootstrapSe =
      sampleStandardDeviation(ratios) /
      Math.sqrt(((a.length - 1) / a.length + (b.length - 1) / b.length) / 2);

    expect(propagated.standardError / bootstrapSe).toBeGreaterThan(0.9);
    expect(propagated.standardError / bootstrapSe).toBeLessThan(1.1);
    // Welch–Satterthwaite ν lies between the smaller ν and their sum.
    expect(propagated.degreesOfFreedom!).toBeGreaterThan(24);
    expect(propagated.degreesOfFreedom!).toBeLessThan(53);
  });

  it('treats a stated value as exact and names the basis of mixed inputs', () => {
    const measured = estimateFromReplicates([0.7, 0.72, 0.69]);
    const stated = statedEstimate(0.1);
    const single = estimateFromStandardError(2, 0.1, null, 'delta-method', 1);

    expect(propagateEstimates((p, s) => p / s, [measured, stated]).basis).toBe(
      'replicates',
    );
    expect(propagateEstimates((p, s) => p / s, [measured, single]).basis).toBe(
      'mixed',
    );
    expect(propagateEstimates((s) => s * 2, [stated]).standardError).toBe(0);
  });

  it('says whether an interval lies above, below or across a reference', () => {
    expect(
      intervalRelativeTo(
        estimateFromStandardError(1.2, 0.05, null, 'delta-method', 1),
        1,
      ),
    ).toBe('above');
    expect(
      intervalRelativeTo(
        estimateFromStandardError(0.8, 0.05, null, 'delta-method', 1),
        1,
      ),
    ).toBe('below');
    expect(
      intervalRelativeTo(
        estimateFromStandardError(1.05, 0.05, null, 'delta-method', 1),
        1,
      ),
    ).toBe('includes');
  });

  it('refuses non-finite figures and a single replicate', () => {
    expect(() => estimateFromReplicates([1])).toThrow(
      expect.objectContaining({ code: 'analysis_failed' }),
    );
    expect(() =>
      propagateEstimates(
        (x) => 1 / x,
        [estimateFromStandardError(0, 0.1, null, 'delta-method', 1)],
      ),
    ).toThrow(expect.objectContaining({ code: 'analysis_failed' }));
  });
});
