import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { writePhantomSession } from '../../../server/synthetic/phantom-session.ts';
import { gridFiguresFromComponents } from '../../../shared/physics/grid-figures.ts';
import { runLamella } from '../../helpers/dicom-cli.ts';
import { TEST_GRID, slabSpec } from '../analysis/synthetic-images.ts';

const workDir = mkdtempSync(path.join(tmpdir(), 'lamella-compare-'));
let gridFile = '';
let noGridFile = '';

beforeAll(async () => {
  [noGridFile, gridFile] = await writePhantomSession(workDir, {
    stationName: 'SGH-DR1',
    kvp: 81,
    bodyPartThicknessMm: 200,
    sidMm: 1150,
    dapDgyCm2PerMas: 0.08,
    exposures: [
      { fileName: 'no-grid.dcm', spec: slabSpec({ seed: 1 }) },
      {
        fileName: 'grid.dcm',
        spec: slabSpec({ seed: 2, grid: TEST_GRID, exposureMas: 20 }),
      },
    ],
  });
});
afterAll(() => rmSync(workDir, { recursive: true, force: true }));

const ROI_KEYS = [
  'roi',
  'n',
  'mean',
  'sd',
  'sdPopulation',
  'min',
  'max',
  'median',
];
const SIDE_KEYS = [
  'object',
  'background',
  'contrast',
  'cnr',
  'cnrPooled',
  'snr',
  'exposureMas',
];
const TOP_KEYS = [
  'grid',
  'noGrid',
  'contrastImprovementFactor',
  'primaryTransmission',
  'totalTransmission',
  'buckyFactor',
  'snrImprovementFactor',
  'doseSaving',
  'warnings',
];

function compare(extra: string[] = []) {
  return runLamella([
    'compare',
    '--grid',
    gridFile,
    '--no-grid',
    noGridFile,
    '--object',
    'circle:80,80,22',
    '--background',
    'ring:80,80,32,60',
    ...extra,
  ]);
}

describe('lamella compare', () => {
  it('prints exactly the JSON object of the contract', () => {
    const run = compare(['--json']);

    expect(run.status, run.stderr).toBe(0);
    expect(run.stdout.trim().split('\n')).toHaveLength(1);
    const result = JSON.parse(run.stdout) as Record<
      string,
      Record<string, unknown>
    >;
    expect(Object.keys(result)).toEqual(TOP_KEYS);
    for (const side of ['grid', 'noGrid']) {
      expect(Object.keys(result[side]!)).toEqual(SIDE_KEYS);
      expect(Object.keys(result[side]!.object as object)).toEqual(ROI_KEYS);
      expect(Object.keys(result[side]!.background as object)).toEqual(ROI_KEYS);
    }
    expect(result.grid!.object).toEqual(
      expect.objectContaining({ roi: 'circle:80,80,22' }),
    );
    expect(result.grid!.exposureMas).toBe(20);
    expect(result.warnings).toEqual([]);
  });

  it('gives figures near the analytic values of the synthetic grid', () => {
    const result = JSON.parse(compare(['--json']).stdout) as Record<
      string,
      number
    >;
    // PHYSICS.md §2 derived relations for Tp 0.70, Ts 0.10, SPR 4.
    const truth = gridFiguresFromComponents(0.7, 0.1, 4);

    expect(result.totalTransmission).toBeCloseTo(truth.totalTransmission, 2);
    expect(result.buckyFactor).toBeCloseTo(truth.buckyFactor, 1);
    expect(result.primaryTransmission).toBeCloseTo(0.7, 1);
    expect(
      Math.abs(
        result.contrastImprovementFactor! / truth.contrastImprovementFactor - 1,
      ),
    ).toBeLessThan(0.05);
    expect(
      Math.abs(result.snrImprovementFactor! / truth.snrImprovementFactor - 1),
    ).toBeLessThan(0.05);
    expect(result.doseSaving).toBeCloseTo(
      1 - 1 / result.snrImprovementFactor! ** 2,
      12,
    );
  });

  it('uses the dose measure named by --dose and prints a table without --json', () => {
    const dap = JSON.parse(
      compare(['--json', '--dose', 'dap']).stdout,
    ) as Record<string, number>;
    const mas = JSON.parse(compare(['--json']).stdout) as Record<
      string,
      number
    >;
    const text = compare();

    // The synthetic DAP is 0.08 dGy·cm² per mAs, so both give the same SIF.
    expect(dap.snrImprovementFactor).toBeCloseTo(mas.snrImprovementFactor!, 10);
    expect(text.status).toBe(0);
    expect(text.stdout).toContain('SNR improvement factor at equal dose');
  });

  it('fails with exit 2 and the error object for a missing file, bad region and missing flag', () => {
    const missing = runLamella([
      'compare',
      '--grid',
      path.join(workDir, 'nope.dcm'),
      '--no-grid',
      noGridFile,
      '--object',
      'circle:80,80,22',
      '--background',
      'ring:80,80,32,60',
      '--json',
    ]);
    const badRegion = compare(['--json', '--object', 'blob:1']);
    const noObject = runLamella([
      'compare',
      '--grid',
      gridFile,
      '--no-grid',
      noGridFile,
      '--background',
      'ring:80,80,32,60',
      '--json',
    ]);
    const badDose = compare(['--json', '--dose', 'kerma']);

    for (const [run, code] of [
      [missing, 'file_unreadable'],
      [badRegion, 'region_invalid'],
      [noObject, 'usage'],
      [badDose, 'usage'],
    ] as const) {
      expect(run.status).toBe(2);
      const body = JSON.parse(run.stdout) as {
        error: { code: string; message: string };
      };
      expect(Object.keys(body)).toEqual(['error']);
      expect(Object.keys(body.error)).toEqual(['code', 'message']);
      expect(body.error.code).toBe(code);
      expect(run.stderr).toMatch(/^lamella compare: /);
      expect(run.stderr).not.toContain('    at ');
    }
  });
});
