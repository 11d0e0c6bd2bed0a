import { describe, expect, it } from 'vitest';
import { estimateFromStandardError } from '../../../shared/analysis/estimate.ts';
import { gridVerdict } from '../../../shared/analysis/verdict.ts';

const sif = (value: number, se: number) =>
  estimateFromStandardError(value, se, null, 'delta-method', 1);

describe('verdict at equal dose', () => {
  it('reports a benefit with X % ± Y % when the interval lies above 1', () => {
    const verdict = gridVerdict(sif(1.25, 0.05), null);

    expect(verdict.outcome).toBe('benefit');
    expect(verdict.changePercent).toBeCloseTo(25, 10);
    // Half-width 1.96 × 0.05 (normal interval, NIST/SEMATECH §1.3.6.7.1).
    expect(verdict.changeHalfWidthPercent).toBeCloseTo(9.8, 2);
    expect(verdict.sentence).toMatch(
      /^At equal dose the grid improves CNR by 25 % ± 9\.8 %/,
    );
  });

  it('reports "no measurable benefit" when the interval includes 1', () => {
    const verdict = gridVerdict(sif(1.03, 0.05), null);

    expect(verdict.outcome).toBe('no-measurable-benefit');
    expect(verdict.sentence).toContain('No measurable benefit');
  });

  it('reports that the grid costs SNR when the interval lies below 1', () => {
    const verdict = gridVerdict(sif(0.85, 0.03), null);

    expect(verdict.outcome).toBe('cost');
    expect(verdict.sentence).toMatch(/^The grid costs SNR at equal dose/);
  });
});
