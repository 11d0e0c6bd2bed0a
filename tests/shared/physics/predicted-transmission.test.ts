import { beforeAll, describe, expect, it } from 'vitest';
import { completeGridConstruction } from '../../../shared/physics/grid-construction.ts';
import {
  predictGridTransmissions,
  primaryTransmissionAt,
  scatterTransmissionAt,
  type GridBuild,
} from '../../../shared/physics/predicted-transmission.ts';
import { linearAttenuationPerCm } from '../../../shared/physics/attenuation.ts';
import { DomainError } from '../../../shared/errors.ts';
import {
  requireReferencePython,
  runReferenceScript,
} from '../../helpers/dicom-reference-python.ts';

// PHYSICS.md §6: N 40, t 36 µm, r 12 (D 214 µm, h 2568 µm).
const construction = completeGridConstruction({
  stripFrequencyPerCm: 40,
  stripThicknessUm: 36,
  ratio: 12,
});
const aluminiumGrid: GridBuild = {
  construction,
  interspaceMaterial: 'aluminium',
};
const paperGrid: GridBuild = {
  construction,
  interspaceMaterial: 'cellulose',
  interspaceDensityGPerCm3: 1.0,
};

interface MonteCarloResult {
  primary: number;
  scatter: number;
}

/** tests/reference/xraylib_grid_transmission.py (numpy Monte Carlo + xraylib). */
function monteCarlo(
  interspace: [number | string, number],
  lines: Array<[number, number]>,
  covers: Array<[number | string, number, number]> = [],
  samples = 2_000_000,
): MonteCarloResult {
  return runReferenceScript<MonteCarloResult>(
    'xraylib_grid_transmission.py',
    [],
    {
      strip_height_um: construction.stripHeightUm,
      interspace_width_um: construction.interspaceWidthUm,
      strip_thickness_um: construction.stripThicknessUm,
      strip: [82, 11.35],
      interspace,
      covers,
      lines,
      max_angle_deg: 90,
      samples,
      seed: 7,
    },
  );
}

/** E1(x) by its power series (Abramowitz & Stegun 5.1.11), fine for x < 1. */
function exponentialIntegralE1(x: number): number {
  const eulerGamma = 0.5772156649015329;
  let sum = 0;
  let term = 1;
  for (let k = 1; k < 40; k++) {
    term *= -x / k;
    sum += term / k;
  }
  return -eulerGamma - Math.log(x) - sum;
}

describe('primaryTransmissionAt', () => {
  it.each([
    // PHYSICS.md §6 derived check values (μ from xraylib, ρ Al 2.699, Pb 11.35).
    ['aluminium interspace at 60 keV', aluminiumGrid, 60, 0.7061],
    ['cellulose interspace (ρ 1.0) at 60 keV', paperGrid, 60, 0.8148],
    ['aluminium interspace at 100 keV', aluminiumGrid, 100, 0.7606],
  ])('gives Tp for an %s', (_label, grid, energyKeV, expected) => {
    expect(
      Math.abs(primaryTransmissionAt(grid, energyKeV) - expected),
    ).toBeLessThan(1e-4);
  });

  it('multiplies by the cover plates', () => {
    const covered: GridBuild = {
      ...aluminiumGrid,
      coverPlates: [{ material: 'carbon-fibre', thicknessUm: 500 }],
    };
    const coverTransmission = Math.exp(
      -linearAttenuationPerCm('carbon-fibre', 60) * 0.05,
    );

    expect(primaryTransmissionAt(covered, 60)).toBeCloseTo(
      primaryTransmissionAt(aluminiumGrid, 60) * coverTransmission,
      12,
    );
  });
});

describe('scatterTransmissionAt', () => {
  beforeAll(() => requireReferencePython(['xraylib', 'numpy']));

  it.each([
    ['aluminium', 60, [13, 2.699]],
    ['aluminium', 100, [13, 2.699]],
    ['cellulose', 60, ['C6H10O5', 1.0]],
  ] as const)(
    'agrees with a Monte Carlo of the same model (%s interspace, %d keV)',
    (label, energyKeV, interspace) => {
      const grid = label === 'aluminium' ? aluminiumGrid : paperGrid;
      const reference = monteCarlo(
        [interspace[0], interspace[1]],
        [[energyKeV, 1]],
      );

      // tests/reference/xraylib_grid_transmission.py, 2·10⁶ samples (about 0.15 % s.e.)
      expect(
        Math.abs(
          scatterTransmissionAt(grid, energyKeV) / reference.scatter - 1,
        ),
      ).toBeLessThan(0.005);
    },
  );

  it('agrees with the Monte Carlo through a carbon-fibre cover', () => {
    const covered: GridBuild = {
      ...aluminiumGrid,
      coverPlates: [{ material: 'carbon-fibre', thicknessUm: 500 }],
    };
    const reference = monteCarlo([13, 2.699], [[60, 1]], [[6, 1.6, 500]]);

    // tests/reference/xraylib_grid_transmission.py
    expect(
      Math.abs(scatterTransmissionAt(covered, 60) / reference.scatter - 1),
    ).toBeLessThan(0.005);
    expect(
      Math.abs(primaryTransmissionAt(covered, 60) / reference.primary - 1),
    ).toBeLessThan(0.005);
  });

  it('gives 2·E3(μh) for a uniform slab under isotropic radiance', () => {
    // Slab transmission of isotropic radiance counted through a plane:
    // 2·E3(τ), E3(τ) = [e^−τ(1 − τ) + τ²·E1(τ)]/2 (Abramowitz & Stegun 5.1.14).
    const slab: GridBuild = {
      construction,
      stripMaterial: 'aluminium',
      interspaceMaterial: 'aluminium',
    };
    const tau =
      linearAttenuationPerCm('aluminium', 60) *
      (construction.stripHeightUm / 1e4);
    const expected =
      Math.exp(-tau) * (1 - tau) + tau * tau * exponentialIntegralE1(tau);

    expect(
      Math.abs(scatterTransmissionAt(slab, 60) / expected - 1),
    ).toBeLessThan(5e-4);
    expect(primaryTransmissionAt(slab, 60)).toBeCloseTo(Math.exp(-tau), 12);
  });

  it('lets less scatter through when the angles are limited less', () => {
    const narrow = scatterTransmissionAt(aluminiumGrid, 60, {
      maxAngleDeg: 10,
    });
    const wide = scatterTransmissionAt(aluminiumGrid, 60);

    expect(narrow).toBeGreaterThan(wide);
    expect(narrow).toBeLessThan(primaryTransmissionAt(aluminiumGrid, 60));
  });

  it('refuses a largest angle beyond 90°', () => {
    expect(() =>
      scatterTransmissionAt(aluminiumGrid, 60, { maxAngleDeg: 95 }),
    ).toThrow(DomainError);
  });
});

describe('predictGridTransmissions', () => {
  it('derives Tt, K, B, Σ and SIF from Tp, Ts and the assumed SPR', () => {
    const prediction = predictGridTransmissions(
      aluminiumGrid,
      { energyKeV: 60 },
      { scatterToPrimaryRatio: 4 },
    );
    const {
      primaryTransmission: tp,
      scatterTransmission: ts,
      figures,
    } = prediction;
    // PHYSICS.md §2 relations: Tt = (Tp + SPR·Ts)/(1 + SPR), K = Tp/Tt, B = 1/Tt, Σ = Tp/Ts, SIF = Tp/√Tt.
    const tt = (tp + 4 * ts) / 5;

    expect(tp).toBeCloseTo(primaryTransmissionAt(aluminiumGrid, 60), 12);
    expect(figures.totalTransmission).toBeCloseTo(tt, 12);
    expect(figures.contrastImprovementFactor).toBeCloseTo(tp / tt, 12);
    expect(figures.buckyFactor).toBeCloseTo(1 / tt, 12);
    expect(figures.selectivity).toBeCloseTo(tp / ts, 12);
    expect(figures.snrImprovementFactor).toBeCloseTo(tp / Math.sqrt(tt), 12);
    expect(prediction.assumptions).toMatchObject({
      scatterToPrimaryRatio: 4,
      weighting: 'monoenergetic',
      stripMaterial: 'Lead',
      interspaceMaterial: 'Aluminium',
    });
    expect(prediction.assumptions.scatterModel).toMatch(
      /isotropic scatter radiance/,
    );
    expect(prediction.warnings).toEqual([]);
  });

  it('warns about a ratio outside the usual range', () => {
    const tall = completeGridConstruction({
      stripFrequencyPerCm: 40,
      stripThicknessUm: 36,
      ratio: 24,
    });
    const prediction = predictGridTransmissions(
      { construction: tall, interspaceMaterial: 'aluminium' },
      { energyKeV: 80 },
      { scatterToPrimaryRatio: 1 },
    );

    expect(prediction.warnings.map((warning) => warning.code)).toEqual([
      'unusual_grid_value',
    ]);
  });

  it('refuses a negative SPR', () => {
    expect(() =>
      predictGridTransmissions(
        aluminiumGrid,
        { energyKeV: 60 },
        { scatterToPrimaryRatio: -1 },
      ),
    ).toThrow(DomainError);
  });
});
