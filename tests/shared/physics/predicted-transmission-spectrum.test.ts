import { readFileSync } from 'node:fs';
import path from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { completeGridConstruction } from '../../../shared/physics/grid-construction.ts';
import {
  predictGridTransmissions,
  primaryTransmissionAt,
  type GridBuild,
} from '../../../shared/physics/predicted-transmission.ts';
import {
  kramersSpectrum,
  parseSpectrumCsv,
} from '../../../shared/physics/x-ray-spectrum.ts';
import { DomainError } from '../../../shared/errors.ts';
import {
  requireReferencePython,
  runReferenceScript,
} from '../../helpers/dicom-reference-python.ts';

const FIXTURE = path.resolve(
  import.meta.dirname,
  '../../../fixtures/spectra/kramers-80kv-2.5mm-al.csv',
);

// PHYSICS.md §6 construction: N 40, t 36 µm, r 12.
const construction = completeGridConstruction({
  stripFrequencyPerCm: 40,
  stripThicknessUm: 36,
  ratio: 12,
});
const aluminiumGrid: GridBuild = {
  construction,
  interspaceMaterial: 'aluminium',
};

describe('parseSpectrumCsv', () => {
  it('reads pairs, skipping comments, blank lines and a header', () => {
    const bins = parseSpectrumCsv(
      '# made by hand\nenergy_keV,fluence\n\n40,2\n60, 1\r\n',
    );

    expect(bins).toEqual([
      { energyKeV: 40, fluence: 2 },
      { energyKeV: 60, fluence: 1 },
    ]);
  });

  it('names the first line that is not a pair', () => {
    expect(() => parseSpectrumCsv('40,1\n50\n')).toThrow(/line 2/);
    expect(() => parseSpectrumCsv('# nothing\n')).toThrow(DomainError);
  });
});

describe('kramersSpectrum', () => {
  it('matches the xraylib-filtered fixture bin by bin', () => {
    // fixtures/spectra/kramers-80kv-2.5mm-al.csv from tests/reference/xraylib_kramers_spectrum.py
    const reference = parseSpectrumCsv(readFileSync(FIXTURE, 'utf8'));
    const spectrum = kramersSpectrum(80, [
      { material: 'aluminium', thicknessMm: 2.5 },
    ]);

    expect(spectrum.map((bin) => bin.energyKeV)).toEqual(
      reference.map((bin) => bin.energyKeV),
    );
    spectrum.forEach((bin, index) => {
      expect(
        Math.abs(bin.fluence - reference[index]!.fluence),
        `${bin.energyKeV} keV`,
      ).toBeLessThan(0.005);
    });
  });

  it('follows (E0 − E)/E without filtration', () => {
    // Kramers, Phil Mag 1923;46:836: photon fluence per keV ∝ (E0 − E)/E.
    const spectrum = kramersSpectrum(100, [], 10);

    expect(spectrum.map((bin) => bin.energyKeV)).toEqual([
      5, 15, 25, 35, 45, 55, 65, 75, 85, 95,
    ]);
    expect(spectrum[1]!.fluence / spectrum[0]!.fluence).toBeCloseTo(
      85 / 15 / (95 / 5),
      12,
    );
  });

  it('refuses a voltage beyond the attenuation tables', () => {
    expect(() => kramersSpectrum(250, [])).toThrow(DomainError);
  });
});

describe('predictGridTransmissions over a spectrum', () => {
  beforeAll(() => requireReferencePython(['xraylib', 'numpy']));

  it('agrees with the Monte Carlo reference weighted by energy fluence', () => {
    const spectrum = parseSpectrumCsv(readFileSync(FIXTURE, 'utf8'));
    const lines = spectrum
      .filter((bin) => bin.fluence > 1e-6)
      .map((bin): [number, number] => [
        bin.energyKeV,
        bin.energyKeV * bin.fluence,
      ]);
    const reference = runReferenceScript<{ primary: number; scatter: number }>(
      'xraylib_grid_transmission.py',
      [],
      {
        strip_height_um: construction.stripHeightUm,
        interspace_width_um: construction.interspaceWidthUm,
        strip_thickness_um: construction.stripThicknessUm,
        strip: [82, 11.35],
        interspace: [13, 2.699],
        covers: [],
        lines,
        max_angle_deg: 90,
        samples: 400_000,
        seed: 11,
      },
    );

    const prediction = predictGridTransmissions(
      aluminiumGrid,
      { spectrum, weighting: 'energy' },
      { scatterToPrimaryRatio: 4 },
    );

    // tests/reference/xraylib_grid_transmission.py (xraylib μ, numpy Monte Carlo)
    expect(
      Math.abs(prediction.primaryTransmission / reference.primary - 1),
    ).toBeLessThan(0.005);
    expect(
      Math.abs(prediction.scatterTransmission / reference.scatter - 1),
    ).toBeLessThan(0.01);
    expect(prediction.assumptions.weighting).toBe('energy');
  });

  it('weights lines by photons when asked', () => {
    const spectrum = [
      { energyKeV: 40, fluence: 3 },
      { energyKeV: 80, fluence: 1 },
    ];
    const tp40 = primaryTransmissionAt(aluminiumGrid, 40);
    const tp80 = primaryTransmissionAt(aluminiumGrid, 80);

    const byPhotons = predictGridTransmissions(
      aluminiumGrid,
      { spectrum, weighting: 'photons' },
      { scatterToPrimaryRatio: 1 },
    );
    const byEnergy = predictGridTransmissions(
      aluminiumGrid,
      { spectrum },
      { scatterToPrimaryRatio: 1 },
    );

    expect(byPhotons.primaryTransmission).toBeCloseTo(
      (3 * tp40 + tp80) / 4,
      12,
    );
    expect(byEnergy.primaryTransmission).toBeCloseTo(
      (120 * tp40 + 80 * tp80) / 200,
      12,
    );
  });

  it('refuses an empty spectrum, one without fluence, and lines beyond 200 keV', () => {
    const predict = (spectrum: Array<{ energyKeV: number; fluence: number }>) =>
      predictGridTransmissions(
        aluminiumGrid,
        { spectrum },
        { scatterToPrimaryRatio: 1 },
      );

    expect(() => predict([])).toThrow(DomainError);
    expect(() => predict([{ energyKeV: 60, fluence: 0 }])).toThrow(DomainError);
    expect(() => predict([{ energyKeV: 250, fluence: 1 }])).toThrow(
      DomainError,
    );
  });
});
