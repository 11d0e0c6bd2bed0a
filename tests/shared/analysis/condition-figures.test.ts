import { describe, expect, it } from 'vitest';
import type { ImageMeasurement } from '../../../shared/analysis/condition-figures.ts';
import { conditionFigures } from '../../../shared/analysis/condition-figures.ts';
import { imageFigures } from '../../../shared/analysis/image-figures.ts';

/** An image whose object and background means are given, 1000 pixels each. */
function measured(
  objectMean: number,
  backgroundMean: number,
  sd: number,
  exposureMas: number | null,
  dose: number | null = exposureMas,
): ImageMeasurement {
  return {
    figures: imageFigures(
      { n: 1000, mean: objectMean, sampleSd: sd },
      { n: 1000, mean: backgroundMean, sampleSd: sd },
    ),
    exposureMas,
    dose,
    beamStop: null,
  };
}

const OPTIONS = {
  doseMeasure: 'mas' as const,
  cnrDefinition: 'background-sd' as const,
};

describe('condition figures', () => {
  it('computes CIF, Tt, Tp, B, SIF, dose saving and Q by hand-checkable numbers', () => {
    // No grid: S_bg 1000, S_obj 900 at 10 mAs, σ 30. Grid at 20 mAs:
    // S_bg 440, S_obj 300, σ 20 (per mAs 22 and 7 → Tt 0.22, Tp 0.7).
    const f = conditionFigures(
      [measured(300, 440, 20, 20)],
      [measured(900, 1000, 30, 10)],
      OPTIONS,
    );

    expect(f.contrastImprovementFactor.value).toBeCloseTo(140 / 440 / 0.1, 10);
    expect(f.totalTransmission!.value).toBeCloseTo(0.22, 10);
    expect(f.primaryTransmission!.value).toBeCloseTo(0.7, 10);
    expect(f.buckyFactor!.value).toBeCloseTo(1 / 0.22, 10);
    const sif = 140 / 20 / Math.sqrt(20) / (100 / 30 / Math.sqrt(10));
    expect(f.snrImprovementFactor!.value).toBeCloseTo(sif, 10);
    expect(f.doseSaving!.value).toBeCloseTo(1 - 1 / sif ** 2, 10);
    expect(f.imageImprovementFactor!.value).toBeCloseTo(0.49 / 0.22, 10);
    expect(f.grid.figureOfMerit!.value).toBeCloseTo(49 / 20, 10);
    expect(f.selectivity).toBeNull();
    expect(f.welch).toBeNull();
    expect(f.method.uncertainty).toBe('delta-method');
    expect(f.method.label).toContain('field values');
  });

  it('uses the replicate spread and a Welch test when both sides have replicates', () => {
    const f = conditionFigures(
      [
        measured(300, 440, 20, 10),
        measured(302, 441, 20, 10),
        measured(299, 439, 21, 10),
      ],
      [measured(900, 1000, 30, 10), measured(899, 1001, 31, 10)],
      OPTIONS,
    );

    expect(f.contrastImprovementFactor.basis).toBe('replicates');
    expect(f.grid.cnr.degreesOfFreedom).toBe(2);
    expect(f.welch!.nA).toBe(3);
    expect(f.welch!.nB).toBe(2);
    expect(f.verdict!.outcome).toBe('benefit');
  });

  it('gives null transmissions and SIF with warnings when exposures are missing', () => {
    const f = conditionFigures(
      [measured(300, 440, 20, null)],
      [measured(900, 1000, 30, 10)],
      OPTIONS,
    );

    expect(f.totalTransmission).toBeNull();
    expect(f.buckyFactor).toBeNull();
    expect(f.snrImprovementFactor).toBeNull();
    expect(f.verdict).toBeNull();
    expect(f.warnings.map((w) => w.code)).toEqual(
      expect.arrayContaining(['exposure_missing', 'dose_missing']),
    );
  });

  it('warns about replicates of different exposure and transmissions above 1', () => {
    const f = conditionFigures(
      [measured(900, 1000, 30, 10), measured(900, 1000, 30, 12)],
      [measured(900, 1000, 30, 10)],
      OPTIONS,
    );

    expect(f.warnings.map((w) => w.code)).toContain(
      'replicate_exposures_differ',
    );
    const g = conditionFigures(
      [measured(900, 1000, 30, 5)],
      [measured(900, 1000, 30, 10)],
      OPTIONS,
    );
    expect(g.warnings.map((w) => w.code)).toContain('transmission_above_one');
  });

  it('uses a stated Ts for selectivity', () => {
    const f = conditionFigures(
      [measured(300, 440, 20, 20)],
      [measured(900, 1000, 30, 10)],
      {
        ...OPTIONS,
        statedScatterTransmission: 0.1,
      },
    );

    expect(f.selectivity!.value).toBeCloseTo(7, 10);
    expect(f.method.scatterTransmissionSource).toBe('stated');
  });
});
