import { spawnSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { completeGridConstruction } from '../../../shared/physics/grid-construction.ts';
import { predictGridTransmissions } from '../../../shared/physics/predicted-transmission.ts';
import { parseSpectrumCsv } from '../../../shared/physics/x-ray-spectrum.ts';

const ROOT = path.resolve(import.meta.dirname, '../../..');
const SPECTRUM = 'fixtures/spectra/kramers-80kv-2.5mm-al.csv';

/** Runs the real bin, `node server/scripts/lamella.mjs geometry …`. */
function lamella(args: string[]) {
  const result = spawnSync(
    process.execPath,
    ['server/scripts/lamella.mjs', 'geometry', ...args],
    { cwd: ROOT, encoding: 'utf8', timeout: 60_000 },
  );
  return {
    status: result.status,
    stdout: result.stdout,
    stderr: result.stderr,
  };
}

function lamellaJson<T>(args: string[]): T {
  const { status, stdout, stderr } = lamella([...args, '--json']);
  expect(status, stderr).toBe(0);
  return JSON.parse(stdout) as T;
}

interface PlanJson {
  edgeLossFraction: number;
  centreLossFraction: number;
  focusingRange: {
    nearCm: number;
    farCm: number | null;
    criterionSource: string;
  };
  isWithinFocusingRange: boolean;
  upsideDownTotalCutoffCm?: number;
  profile: Array<{ positionCm: number; lossFraction: number }>;
  warnings: Array<{ code: string }>;
}

interface TransmissionJson {
  construction: { interspaceWidthUm: number; stripHeightUm: number };
  primaryTransmission: number;
  scatterTransmission: number;
  figures: {
    totalTransmission: number;
    contrastImprovementFactor: number;
    buckyFactor: number;
    selectivity: number;
    snrImprovementFactor: number;
  };
  assumptions: {
    scatterToPrimaryRatio: number;
    scatterModel: string;
    weighting: string;
  };
}

describe('lamella geometry (planner)', () => {
  it('gives the focusing range and edge loss of PHYSICS.md §5', () => {
    // PHYSICS.md §5 derived check values: r 12, f0 100, c 20 → 85.7–120.0 cm.
    const plan = lamellaJson<PlanJson>([
      '--ratio',
      '12',
      '--focus-cm',
      '100',
      '--sid-cm',
      '80',
      '--field-cm',
      '40',
      '--points',
      '5',
    ]);

    expect(plan.focusingRange.nearCm).toBeCloseTo(85.7, 1);
    expect(plan.focusingRange.farCm).toBeCloseTo(120.0, 1);
    expect(plan.focusingRange.criterionSource).toBe('from memory of IEC 60627');
    expect(plan.isWithinFocusingRange).toBe(false);
    expect(plan.edgeLossFraction).toBeCloseTo(0.6, 10);
    expect(plan.profile.map((point) => point.positionCm)).toEqual([
      -20, -10, 0, 10, 20,
    ]);
    expect(plan.warnings.map((warning) => warning.code)).toEqual([
      'outside_focusing_range',
    ]);
  });

  it.each([
    // PHYSICS.md §5 derived check values at c = 20 cm (40 cm field).
    ['8', '100', 80.0, 133.3],
    ['10', '100', 83.3, 125.0],
    ['12', '180', 138.5, 257.1],
  ])('gives the range for r %s, f0 %s cm', (ratio, focusCm, nearCm, farCm) => {
    const plan = lamellaJson<PlanJson>([
      '--ratio',
      ratio,
      '--focus-cm',
      focusCm,
      '--sid-cm',
      focusCm,
      '--field-cm',
      '40',
    ]);

    expect(plan.focusingRange.nearCm).toBeCloseTo(nearCm, 1);
    expect(plan.focusingRange.farCm).toBeCloseTo(farCm, 1);
  });

  it('gives the distance and lateral losses of PHYSICS.md §5', () => {
    // PHYSICS.md §5: r 10, f0 100, f1 150, c 20 → 0.667; r 12, b 2 cm, f0 100 → 0.24.
    const far = lamellaJson<PlanJson>([
      '--ratio',
      '10',
      '--focus-cm',
      '100',
      '--sid-cm',
      '150',
      '--field-cm',
      '40',
    ]);
    const offset = lamellaJson<PlanJson>([
      '--ratio',
      '12',
      '--focus-cm',
      '100',
      '--sid-cm',
      '100',
      '--field-cm',
      '40',
      '--offset-cm',
      '2',
    ]);

    expect(far.edgeLossFraction).toBeCloseTo(2 / 3, 10);
    expect(offset.centreLossFraction).toBeCloseTo(0.24, 10);
    expect(offset.edgeLossFraction).toBeCloseTo(0.24, 10);
  });

  it('reports total cut-off of an upside-down grid beyond f0/(2r)', () => {
    // PHYSICS.md §5: r 10, f0 100 upside down → total beyond 5.0 cm.
    const plan = lamellaJson<PlanJson>([
      '--ratio',
      '10',
      '--focus-cm',
      '100',
      '--sid-cm',
      '100',
      '--field-cm',
      '30',
      '--upside-down',
    ]);

    expect(plan.upsideDownTotalCutoffCm).toBeCloseTo(5, 10);
    expect(plan.warnings.map((warning) => warning.code)).toContain(
      'total_cutoff_in_field',
    );
  });

  it('prints a readable plan without --json', () => {
    const { status, stdout } = lamella([
      '--ratio',
      '12',
      '--focus-cm',
      '100',
      '--sid-cm',
      '100',
      '--field-cm',
      '40',
    ]);

    expect(status).toBe(0);
    expect(stdout).toMatch(/Focusing range .*: 85\.7–120\.0 cm/);
  });
});

describe('lamella geometry transmission', () => {
  const construction = [
    '--ratio',
    '12',
    '--strip-frequency',
    '40',
    '--strip-thickness-um',
    '36',
  ];

  it.each([
    // PHYSICS.md §6 derived check values (no cover plates).
    ['al', '60', [], 0.7061],
    ['cellulose', '60', ['--interspace-density', '1.0'], 0.8148],
    ['aluminium', '100', [], 0.7606],
  ])(
    'gives Tp with a %s interspace at %s keV',
    (interspace, energyKeV, extra, expected) => {
      const result = lamellaJson<TransmissionJson>([
        'transmission',
        ...construction,
        '--interspace',
        interspace,
        ...extra,
        '--energy-kev',
        energyKeV,
      ]);

      expect(result.construction.interspaceWidthUm).toBeCloseTo(214, 9);
      expect(result.construction.stripHeightUm).toBeCloseTo(2568, 9);
      expect(Math.abs(result.primaryTransmission - expected)).toBeLessThan(
        1e-4,
      );
    },
  );

  it('derives K, B, Σ and SIF for the stated SPR', () => {
    const result = lamellaJson<TransmissionJson>([
      'transmission',
      ...construction,
      '--interspace',
      'al',
      '--energy-kev',
      '60',
      '--spr',
      '2',
    ]);
    const {
      primaryTransmission: tp,
      scatterTransmission: ts,
      figures,
    } = result;
    // PHYSICS.md §2 relations: Tt = (Tp + SPR·Ts)/(1 + SPR), K = Tp/Tt, B = 1/Tt, Σ = Tp/Ts, SIF = Tp/√Tt.
    const tt = (tp + 2 * ts) / 3;

    expect(figures.totalTransmission).toBeCloseTo(tt, 12);
    expect(figures.contrastImprovementFactor).toBeCloseTo(tp / tt, 12);
    expect(figures.buckyFactor).toBeCloseTo(1 / tt, 12);
    expect(figures.selectivity).toBeCloseTo(tp / ts, 12);
    expect(figures.snrImprovementFactor).toBeCloseTo(tp / Math.sqrt(tt), 12);
    expect(result.assumptions.scatterToPrimaryRatio).toBe(2);
    expect(result.assumptions.scatterModel).toMatch(
      /isotropic scatter radiance/,
    );
  });

  it('reads a spectrum file and weights it by energy fluence', () => {
    const result = lamellaJson<TransmissionJson>([
      'transmission',
      ...construction,
      '--interspace',
      'al',
      '--spectrum',
      SPECTRUM,
    ]);
    const expected = predictGridTransmissions(
      {
        construction: completeGridConstruction({
          ratio: 12,
          stripFrequencyPerCm: 40,
          stripThicknessUm: 36,
        }),
        interspaceMaterial: 'aluminium',
      },
      {
        spectrum: parseSpectrumCsv(
          readFileSync(path.join(ROOT, SPECTRUM), 'utf8'),
        ),
      },
      { scatterToPrimaryRatio: 4 },
    );

    expect(result.assumptions.weighting).toBe('energy');
    expect(result.assumptions.scatterToPrimaryRatio).toBe(4);
    expect(result.primaryTransmission).toBeCloseTo(
      expected.primaryTransmission,
      12,
    );
    expect(result.scatterTransmission).toBeCloseTo(
      expected.scatterTransmission,
      12,
    );
  });
});

describe('lamella geometry errors', () => {
  it('answers a bad flag with exit 2, a usage error and one stderr line', () => {
    const { status, stdout, stderr } = lamella([
      '--ratio',
      '12',
      '--wobble',
      '3',
      '--json',
    ]);

    expect(status).toBe(2);
    expect(JSON.parse(stdout)).toEqual({
      error: { code: 'usage', message: expect.stringMatching(/wobble/) },
    });
    expect(stderr.trim().split('\n')).toHaveLength(1);
  });

  it('names an unknown material', () => {
    const { status, stdout } = lamella([
      'transmission',
      '--ratio',
      '12',
      '--strip-frequency',
      '40',
      '--strip-thickness-um',
      '36',
      '--interspace',
      'unobtainium',
      '--energy-kev',
      '60',
      '--json',
    ]);

    expect(status).toBe(2);
    expect(JSON.parse(stdout).error.code).toBe('usage');
  });

  it('passes a physics error through with its code', () => {
    const { status, stdout, stderr } = lamella([
      'transmission',
      '--ratio',
      '12',
      '--strip-frequency',
      '40',
      '--interspace',
      'al',
      '--energy-kev',
      '60',
      '--json',
    ]);

    expect(status).toBe(2);
    expect(JSON.parse(stdout).error.code).toBe('validation_failed');
    expect(stderr).toMatch(/Not enough to fix the grid/);
  });

  it('reports an unreadable spectrum file', () => {
    const { status, stdout } = lamella([
      'transmission',
      '--ratio',
      '12',
      '--strip-frequency',
      '40',
      '--strip-thickness-um',
      '36',
      '--interspace',
      'al',
      '--spectrum',
      'fixtures/spectra/missing.csv',
      '--json',
    ]);

    expect(status).toBe(2);
    expect(JSON.parse(stdout).error.code).toBe('file_unreadable');
  });
});
