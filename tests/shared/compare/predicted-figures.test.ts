import { describe, expect, it } from 'vitest';
import {
  predictTransmissions,
  predictedWithSpr,
  type GridForPrediction,
} from '../../../shared/compare/predicted-figures.ts';
import { completeGridConstruction } from '../../../shared/physics/grid-construction.ts';
import { predictGridTransmissions } from '../../../shared/physics/predicted-transmission.ts';
import { kramersSpectrum } from '../../../shared/physics/x-ray-spectrum.ts';

const GRID: GridForPrediction = {
  ratio: 12,
  stripFrequencyPerCm: 40,
  stripThicknessUm: 36,
  stripHeightUm: null,
  interspaceWidthUm: null,
  stripMaterial: 'lead',
  interspaceMaterial: 'aluminium',
};

describe('predictedWithSpr', () => {
  it.each([
    // PHYSICS.md §2 derived check table: Tp, Ts, SPR → Tt, K, B, SIF.
    [0.7, 0.1, 1, 0.4, 1.75, 2.5, 1.1068],
    [0.7, 0.1, 4, 0.22, 3.1818, 4.5455, 1.4924],
    [0.65, 0.12, 4, 0.226, 2.8761, 4.4248, 1.3673],
  ])('Tp %s, Ts %s, SPR %s', (tp, ts, spr, tt, k, b, sif) => {
    const p = predictedWithSpr(
      {
        primaryTransmission: tp,
        scatterTransmission: ts,
        selectivity: tp / ts,
        assumptions: '',
      },
      spr,
    );
    expect(p.totalTransmission).toBeCloseTo(tt, 4);
    expect(p.contrastImprovementFactor).toBeCloseTo(k, 4);
    expect(p.buckyFactor).toBeCloseTo(b, 4);
    expect(p.snrImprovementFactor).toBeCloseTo(sif, 4);
  });
});

describe('predictTransmissions', () => {
  it('agrees within 0.5 % with the full-resolution prediction it coarsens', () => {
    const outcome = predictTransmissions(GRID, 81, []);
    if (!outcome.available) throw new Error(outcome.reason);
    // Reference: the library at its default 1 keV bins and 96 × 64 directions
    // (derived; same model, finer quadrature).
    const fine = predictGridTransmissions(
      {
        construction: completeGridConstruction({
          ratio: 12,
          stripFrequencyPerCm: 40,
          stripThicknessUm: 36,
        }),
        stripMaterial: 'lead',
        interspaceMaterial: 'aluminium',
      },
      {
        spectrum: kramersSpectrum(81, [
          { material: 'aluminium', thicknessMm: 2.5 },
        ]),
      },
      { scatterToPrimaryRatio: 1 },
    );
    expect(
      outcome.prediction.primaryTransmission / fine.primaryTransmission,
    ).toBeCloseTo(1, 2);
    expect(
      Math.abs(
        outcome.prediction.primaryTransmission / fine.primaryTransmission - 1,
      ),
    ).toBeLessThan(0.005);
    expect(
      Math.abs(
        outcome.prediction.scatterTransmission / fine.scatterTransmission - 1,
      ),
    ).toBeLessThan(0.005);
    expect(outcome.prediction.selectivity).toBeCloseTo(
      outcome.prediction.primaryTransmission /
        outcome.prediction.scatterTransmission,
      10,
    );
    expect(outcome.prediction.assumptions).toMatch(/Kramers/);
  });

  it('says why there is no prediction without an interspace material or full construction', () => {
    const noInterspace = predictTransmissions(
      { ...GRID, interspaceMaterial: null },
      81,
      [],
    );
    expect(noInterspace.available).toBe(false);
    const incomplete = predictTransmissions(
      { ...GRID, stripThicknessUm: null },
      81,
      [],
    );
    expect(incomplete.available).toBe(false);
    if (!incomplete.available)
      expect(incomplete.reason).toMatch(/Not enough to fix the grid/);
  });
});
