import { describe, expect, it } from 'vitest';
import {
  completeGridConstruction,
  constructionFromDicomGrid,
  deriveGridConstruction,
  gridRangeWarnings,
} from '../../../shared/physics/grid-construction.ts';
import { DomainError } from '../../../shared/errors.ts';

describe('deriveGridConstruction', () => {
  // PHYSICS.md §1 worked examples (common practice): r = h / D.
  it.each([
    [2000, 250, 8],
    [1600, 100, 16],
    [6000, 500, 12],
  ])(
    'gives ratio %d µm / %d µm = %d',
    (stripHeightUm, interspaceWidthUm, ratio) => {
      const { values } = deriveGridConstruction({
        stripHeightUm,
        interspaceWidthUm,
      });

      expect(values.ratio).toBeCloseTo(ratio, 10);
    },
  );

  it('derives the PHYSICS.md §6 construction from N, t and r', () => {
    // PHYSICS.md §6: N 40, t 36 µm, r 12 → D 214 µm, h 2568 µm.
    const construction = completeGridConstruction({
      stripFrequencyPerCm: 40,
      stripThicknessUm: 36,
      ratio: 12,
    });

    expect(construction.interspaceWidthUm).toBeCloseTo(214, 9);
    expect(construction.stripHeightUm).toBeCloseTo(2568, 9);
    expect(construction.periodUm).toBeCloseTo(250, 9);
    expect(construction.openFraction).toBeCloseTo(0.856, 9);
  });

  it('derives r and N from h, D and t', () => {
    const construction = completeGridConstruction({
      stripHeightUm: 2568,
      interspaceWidthUm: 214,
      stripThicknessUm: 36,
    });

    expect(construction.ratio).toBeCloseTo(12, 9);
    expect(construction.stripFrequencyPerCm).toBeCloseTo(40, 9);
  });

  it('derives D from the frequency and thickness, then h from the ratio', () => {
    const construction = completeGridConstruction({
      ratio: 10,
      stripFrequencyPerCm: 50,
      stripThicknessUm: 50,
    });

    expect(construction.interspaceWidthUm).toBeCloseTo(150, 9);
    expect(construction.stripHeightUm).toBeCloseTo(1500, 9);
  });

  it('lists what two values cannot fix', () => {
    const derivation = deriveGridConstruction({
      ratio: 12,
      stripFrequencyPerCm: 40,
    });

    expect(derivation.construction).toBeUndefined();
    expect(derivation.missing).toEqual([
      'stripHeightUm',
      'interspaceWidthUm',
      'stripThicknessUm',
    ]);
    expect(() =>
      completeGridConstruction({ ratio: 12, stripFrequencyPerCm: 40 }),
    ).toThrow(/missing strip height/);
  });

  it('accepts rounded but consistent over-determined values', () => {
    const construction = completeGridConstruction({
      ratio: 12,
      stripFrequencyPerCm: 40,
      stripThicknessUm: 36,
      stripHeightUm: 2600,
    });

    expect(construction.interspaceWidthUm).toBeCloseTo(214, 9);
  });

  it('flags a ratio that disagrees with h/D', () => {
    expect(() =>
      deriveGridConstruction({
        ratio: 12,
        stripHeightUm: 2000,
        interspaceWidthUm: 250,
      }),
    ).toThrow(/Inconsistent construction: ratio 12 but h\/D/);
  });

  it('flags a frequency that disagrees with D and t', () => {
    expect(() =>
      deriveGridConstruction({
        stripFrequencyPerCm: 60,
        interspaceWidthUm: 214,
        stripThicknessUm: 36,
      }),
    ).toThrow(/Inconsistent construction: 60 lines\/cm/);
  });

  it('refuses strips as thick as the period', () => {
    expect(() =>
      deriveGridConstruction({
        stripFrequencyPerCm: 40,
        stripThicknessUm: 250,
      }),
    ).toThrow(DomainError);
  });

  it('refuses zero, negative and non-finite values', () => {
    expect(() => deriveGridConstruction({ ratio: 0 })).toThrow(DomainError);
    expect(() => deriveGridConstruction({ stripHeightUm: -1 })).toThrow(
      DomainError,
    );
    expect(() =>
      deriveGridConstruction({ stripFrequencyPerCm: Number.NaN }),
    ).toThrow(DomainError);
  });
});

describe('constructionFromDicomGrid', () => {
  it('reads N = 10 / Grid Pitch and r from Grid Aspect Ratio', () => {
    // DICOM PS3.3 X-Ray Grid Description Macro: pitch in mm; PHYSICS.md §1.
    const { input, focusDistanceCm } = constructionFromDicomGrid({
      gridPitchMm: 0.25,
      gridAspectRatio: [12, 1],
      gridFocalDistanceMm: 1000,
    });

    expect(input.stripFrequencyPerCm).toBeCloseTo(40, 12);
    expect(input.ratio).toBe(12);
    expect(focusDistanceCm).toBe(100);
  });

  it('leaves out what the header does not give', () => {
    expect(constructionFromDicomGrid({})).toEqual({ input: {} });
  });

  it('refuses a zero pitch', () => {
    expect(() => constructionFromDicomGrid({ gridPitchMm: 0 })).toThrow(
      DomainError,
    );
  });
});

describe('gridRangeWarnings', () => {
  // Ranges: ratio 2–20, 15–90 lines/cm, 50–400 cm (common practice).
  it('warns only about values outside the usual ranges', () => {
    expect(
      gridRangeWarnings({
        ratio: 12,
        stripFrequencyPerCm: 40,
        focusDistanceCm: 100,
      }),
    ).toEqual([]);
    const warnings = gridRangeWarnings({
      ratio: 25,
      stripFrequencyPerCm: 10,
      focusDistanceCm: 500,
    });
    expect(warnings.map((warning) => warning.code)).toEqual([
      'unusual_grid_value',
      'unusual_grid_value',
      'unusual_grid_value',
    ]);
    expect(warnings[0]!.message).toMatch(
      /Grid ratio 25 is outside the usual 2–20/,
    );
  });
});
