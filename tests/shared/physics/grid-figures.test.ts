import { describe, expect, it } from 'vitest';
import {
  buckyFactor,
  contrastImprovementFactor,
  doseSavingAtEqualSnr,
  gridFiguresFromComponents,
  imageImprovementFactor,
  scatterFraction,
  scatterToPrimaryFromTransmissions,
  selectivity,
  snrImprovementFactorFromTransmissions,
  totalTransmissionFromComponents,
} from '../../../shared/physics/grid-figures.ts';

// PHYSICS.md §2 derived check table (Tp, Ts, SPR → Tt, K, B, Σ, SIF, Q).
const CHECK_TABLE = [
  {
    tp: 0.7,
    ts: 0.1,
    spr: 0.5,
    tt: 0.5,
    k: 1.4,
    b: 2.0,
    sigma: 7.0,
    sif: 0.9899,
    q: 0.98,
  },
  {
    tp: 0.7,
    ts: 0.1,
    spr: 1,
    tt: 0.4,
    k: 1.75,
    b: 2.5,
    sigma: 7.0,
    sif: 1.1068,
    q: 1.225,
  },
  {
    tp: 0.7,
    ts: 0.1,
    spr: 4,
    tt: 0.22,
    k: 3.1818,
    b: 4.5455,
    sigma: 7.0,
    sif: 1.4924,
    q: 2.2273,
  },
  {
    tp: 0.65,
    ts: 0.12,
    spr: 4,
    tt: 0.226,
    k: 2.8761,
    b: 4.4248,
    sigma: 5.417,
    sif: 1.3673,
    q: 1.8695,
  },
  {
    tp: 0.6,
    ts: 0.06,
    spr: 6,
    tt: 0.1371,
    k: 4.375,
    b: 7.2917,
    sigma: 10.0,
    sif: 1.6202,
    q: 2.625,
  },
];

describe('grid figures from transmissions', () => {
  it.each(CHECK_TABLE)(
    'reproduces the PHYSICS.md §2 derived check row Tp $tp, Ts $ts, SPR $spr',
    (row) => {
      const figures = gridFiguresFromComponents(row.tp, row.ts, row.spr);

      // PHYSICS.md §2 derived check table, to the digits printed there.
      expect(figures.totalTransmission).toBeCloseTo(row.tt, 4);
      expect(figures.contrastImprovementFactor).toBeCloseTo(row.k, 3);
      expect(figures.buckyFactor).toBeCloseTo(row.b, 3);
      expect(figures.selectivity).toBeCloseTo(row.sigma, 3);
      expect(figures.snrImprovementFactor).toBeCloseTo(row.sif, 4);
      expect(figures.imageImprovementFactor).toBeCloseTo(row.q, 4);
    },
  );

  it('agrees with the single-figure functions and SIF = √Q', () => {
    const tt = totalTransmissionFromComponents(0.65, 0.12, 4);

    expect(buckyFactor(tt)).toBeCloseTo(1 / tt, 12);
    expect(contrastImprovementFactor(0.65, tt)).toBeCloseTo(0.65 / tt, 12);
    expect(selectivity(0.65, 0.12)).toBeCloseTo(0.65 / 0.12, 12);
    expect(snrImprovementFactorFromTransmissions(0.65, tt)).toBeCloseTo(
      Math.sqrt(imageImprovementFactor(0.65, tt)),
      12,
    );
  });

  it('recovers the SPR from Tp, Tt and Ts (PHYSICS.md §2 derived relation)', () => {
    for (const row of CHECK_TABLE) {
      const tt = totalTransmissionFromComponents(row.tp, row.ts, row.spr);
      expect(scatterToPrimaryFromTransmissions(row.tp, tt, row.ts)).toBeCloseTo(
        row.spr,
        10,
      );
    }
  });

  it('tends to K → Σ at large SPR and K → 1 at small SPR (PHYSICS.md §2)', () => {
    expect(
      gridFiguresFromComponents(0.7, 0.1, 1e6).contrastImprovementFactor,
    ).toBeCloseTo(7, 3);
    expect(
      gridFiguresFromComponents(0.7, 0.1, 1e-9).contrastImprovementFactor,
    ).toBeCloseTo(1, 6);
  });

  it('gives a negative dose saving when SIF < 1 (first check row)', () => {
    // PHYSICS.md §2: SIF 0.9899 at SPR 0.5 → 1 − 1/SIF² ≈ −0.0205.
    expect(doseSavingAtEqualSnr(0.98995)).toBeCloseTo(1 - 1 / 0.98995 ** 2, 10);
    expect(doseSavingAtEqualSnr(0.98995)).toBeLessThan(0);
    expect(gridFiguresFromComponents(0.7, 0.1, 4).doseSaving).toBeCloseTo(
      1 - 1 / 2.2273,
      3,
    );
  });

  it('gives the scatter fraction SPR/(1+SPR) and SPR behind the grid SPR/Σ', () => {
    expect(scatterFraction(4)).toBeCloseTo(0.8, 12);
    expect(
      gridFiguresFromComponents(0.7, 0.1, 4).scatterToPrimaryBehindGrid,
    ).toBeCloseTo(4 / 7, 12);
  });

  it('rejects a zero or negative transmission with analysis_failed', () => {
    expect(() => buckyFactor(0)).toThrow(
      expect.objectContaining({ code: 'analysis_failed' }),
    );
    expect(() => selectivity(0.7, -0.1)).toThrow(
      expect.objectContaining({ code: 'analysis_failed' }),
    );
    expect(() => totalTransmissionFromComponents(0.7, 0.1, Number.NaN)).toThrow(
      expect.objectContaining({ code: 'analysis_failed' }),
    );
    expect(() => scatterToPrimaryFromTransmissions(0.7, 0.1, 0.1)).toThrow(
      expect.objectContaining({ code: 'analysis_failed' }),
    );
  });
});
