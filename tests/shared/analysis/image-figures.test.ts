import { describe, expect, it } from 'vitest';
import { imageFigures } from '../../../shared/analysis/image-figures.ts';

const OBJECT = { n: 100, mean: 80, sampleSd: 10 };
const BACKGROUND = { n: 100, mean: 100, sampleSd: 10 };

describe('figures of one image', () => {
  it('computes contrast, CNR and SNR by hand-checkable numbers', () => {
    const figures = imageFigures(OBJECT, BACKGROUND);

    expect(figures.contrast.value).toBeCloseTo(0.2, 12);
    expect(figures.cnr.value).toBeCloseTo(2, 12);
    expect(figures.cnrPooled.value).toBeCloseTo(2, 12);
    expect(figures.snr.value).toBeCloseTo(10, 12);
    expect(figures.signalDifference.value).toBe(20);
    expect(figures.method.cnrDefinition).toBe('background-sd');
    expect(figures.method.cnr).toContain('σ_bg');
  });

  it('gives delta-method standard errors from the SDs and pixel counts', () => {
    const figures = imageFigures(OBJECT, BACKGROUND);

    // SE(ΔS) = √(10²/100 + 10²/100) = √2; SE(σ) = 10/√(2·99).
    expect(figures.signalDifference.standardError).toBeCloseTo(Math.SQRT2, 6);
    const relCnr = Math.sqrt((Math.SQRT2 / 20) ** 2 + 1 / (2 * 99));
    expect(figures.cnr.standardError).toBeCloseTo(2 * relCnr, 5);
    // SE(C) = (S_obj/S_bg)·√((1/80)² + (1/100)²).
    expect(figures.contrast.standardError).toBeCloseTo(
      0.8 * Math.sqrt((1 / 80) ** 2 + (1 / 100) ** 2),
      6,
    );
    const relSnr = Math.sqrt((1 / 100) ** 2 + 1 / (2 * 99));
    expect(figures.snr.standardError).toBeCloseTo(10 * relSnr, 5);
    expect(figures.cnr.basis).toBe('delta-method');
  });

  it('uses the pooled SD on request and stores which definition was used', () => {
    const figures = imageFigures(
      { n: 50, mean: 60, sampleSd: 6 },
      { n: 200, mean: 100, sampleSd: 8 },
      {
        cnrDefinition: 'pooled-sd',
      },
    );

    expect(figures.cnr.value).toBeCloseTo(40 / Math.sqrt((36 + 64) / 2), 12);
    expect(figures.cnrBackgroundSd.value).toBeCloseTo(5, 12);
    expect(figures.method.cnrDefinition).toBe('pooled-sd');
  });

  it('takes a detrended noise and a plane level when given', () => {
    const figures = imageFigures(OBJECT, BACKGROUND, {
      backgroundNoise: {
        sampleSd: 5,
        degreesOfFreedom: 97,
        source: 'sd-about-background-plane',
      },
      backgroundLevel: { value: 104, standardError: 0.5 },
    });

    expect(figures.cnr.value).toBeCloseTo(24 / 5, 12);
    expect(figures.contrast.value).toBeCloseTo(24 / 104, 12);
    expect(figures.method.noiseSource).toBe('sd-about-background-plane');
    expect(figures.method.backgroundLevel).toBe('background-plane-at-object');
  });

  it('warns when the object cannot be told from the background', () => {
    const figures = imageFigures(
      { n: 10, mean: 99.5, sampleSd: 10 },
      BACKGROUND,
    );

    expect(figures.warnings.map((w) => w.code)).toContain(
      'contrast_not_significant',
    );
  });

  it('refuses zero background noise, a zero background and single-pixel regions', () => {
    expect(() =>
      imageFigures(OBJECT, { n: 100, mean: 100, sampleSd: 0 }),
    ).toThrow(expect.objectContaining({ code: 'analysis_failed' }));
    expect(() =>
      imageFigures(OBJECT, { n: 100, mean: 0, sampleSd: 3 }),
    ).toThrow(expect.objectContaining({ code: 'analysis_failed' }));
    expect(() =>
      imageFigures({ n: 1, mean: 80, sampleSd: 0 }, BACKGROUND),
    ).toThrow(expect.objectContaining({ code: 'analysis_failed' }));
  });
});
