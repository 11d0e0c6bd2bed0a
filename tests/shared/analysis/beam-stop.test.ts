import { describe, expect, it } from 'vitest';
import { fitBeamStop } from '../../../shared/analysis/beam-stop.ts';

const OPEN = { n: 5000, mean: 1000, sampleSd: 20 };

describe('beam-stop scatter estimate', () => {
  it('extrapolates the disc shadows to zero diameter and gives SPR and SF', () => {
    // Scatter 800 falling 1.5 per mm of disc diameter; total 1000 → P 200.
    const discs = [5, 10, 15, 20].map((d) => ({
      diameterMm: d,
      signal: { n: 300, mean: 800 - 1.5 * d, sampleSd: 18 },
    }));

    const fit = fitBeamStop(discs, OPEN);

    expect(fit.scatterSignal.value).toBeCloseTo(800, 8);
    expect(fit.slopePerMm).toBeCloseTo(-1.5, 10);
    expect(fit.primarySignal.value).toBeCloseTo(200, 8);
    expect(fit.scatterToPrimaryRatio.value).toBeCloseTo(4, 8);
    expect(fit.scatterFraction.value).toBeCloseTo(0.8, 8);
    expect(fit.scatterSignal.standardError).toBeGreaterThan(
      18 / Math.sqrt(1200),
    );
    expect(fit.warnings).toEqual([]);
  });

  it('gives the weighted least-squares intercept SE for two discs', () => {
    const discs = [
      { diameterMm: 10, signal: { n: 100, mean: 500, sampleSd: 10 } },
      { diameterMm: 20, signal: { n: 100, mean: 480, sampleSd: 10 } },
    ];

    const fit = fitBeamStop(discs, OPEN);

    // Intercept = 2·m₁ − m₂, so SE = √(4 + 1)·SE(mean) = √5 · 1.
    expect(fit.scatterSignal.value).toBeCloseTo(520, 10);
    expect(fit.scatterSignal.standardError).toBeCloseTo(Math.sqrt(5), 8);
  });

  it('uses discs of one diameter as measured, with a warning', () => {
    const fit = fitBeamStop(
      [{ diameterMm: 10, signal: { n: 100, mean: 600, sampleSd: 10 } }],
      OPEN,
    );

    expect(fit.scatterSignal.value).toBe(600);
    expect(fit.warnings.map((w) => w.code)).toEqual([
      'beam_stop_not_extrapolated',
    ]);
  });

  it('refuses no discs and a scatter not below the open field', () => {
    expect(() => fitBeamStop([], OPEN)).toThrow(
      expect.objectContaining({ code: 'analysis_failed' }),
    );
    expect(() =>
      fitBeamStop(
        [{ diameterMm: 10, signal: { n: 100, mean: 1200, sampleSd: 10 } }],
        OPEN,
      ),
    ).toThrow(expect.objectContaining({ code: 'analysis_failed' }));
  });
});
