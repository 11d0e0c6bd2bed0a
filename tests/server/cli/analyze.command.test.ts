import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { parse } from 'csv-parse/sync';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { AnalyzeJson } from '../../../server/cli/analyze.command.ts';
import { writePhantomSession } from '../../../server/synthetic/phantom-session.ts';
import type { PhantomSpec } from '../../../server/synthetic/phantom-image.ts';
import { gridFiguresFromComponents } from '../../../shared/physics/grid-figures.ts';
import { runLamella } from '../../helpers/dicom-cli.ts';

const LAYOUT = 'fixtures/layouts/disc-and-beam-stops.json';
const workDir = mkdtempSync(path.join(tmpdir(), 'lamella-analyze-'));
const session = path.join(workDir, 'session');

/** The slab of fixtures/layouts/disc-and-beam-stops.json: 400 × 400 px at 0.2 mm. */
function spec(seed: number, withGrid: boolean): PhantomSpec {
  return {
    columns: 400,
    rows: 400,
    seed,
    pixelSpacingMm: 0.2,
    exposureMas: withGrid ? 20 : 10,
    primaryKermaUgyPerMas: 0.5,
    scatterToPrimaryRatio: 4,
    grid: withGrid
      ? { primaryTransmission: 0.7, scatterTransmission: 0.1 }
      : null,
    kermaPerQuantumUgy: 0.002,
    object: { cx: 200, cy: 200, radiusPx: 32, primaryContrast: 0.1 },
    leadDiscs: [
      { cx: 75, cy: 75, diameterMm: 4 },
      { cx: 325, cy: 75, diameterMm: 8 },
      { cx: 75, cy: 325, diameterMm: 12 },
    ],
    response: { model: 'linear', offset: 0, gainPerUgy: 1000 },
  };
}

beforeAll(async () => {
  await writePhantomSession(session, {
    stationName: 'SGH-DR2',
    kvp: 81,
    bodyPartThicknessMm: 200,
    sidMm: 1150,
    gridAspectRatio: [12, 1],
    exposures: [1, 2, 3, 4].map((i) => ({
      fileName: `${i <= 2 ? 'grid' : 'no-grid'}-${i}.dcm`,
      spec: spec(i, i <= 2),
    })),
  });
  writeFileSync(path.join(session, 'notes.txt'), 'not a DICOM file');
  mkdirSync(path.join(workDir, 'only-no-grid'));
  await writePhantomSession(path.join(workDir, 'only-no-grid'), {
    stationName: 'SGH-DR2',
    kvp: 81,
    bodyPartThicknessMm: 200,
    sidMm: 1150,
    exposures: [{ fileName: 'a.dcm', spec: spec(9, false) }],
  });
});
afterAll(() => rmSync(workDir, { recursive: true, force: true }));

describe('lamella analyze', () => {
  it('forms the condition, applies the layout and gives every figure with its interval', () => {
    const run = runLamella(['analyze', session, '--layout', LAYOUT, '--json']);

    expect(run.status, run.stderr).toBe(0);
    const result = JSON.parse(run.stdout) as AnalyzeJson;
    expect(Object.keys(result)).toEqual([
      'folder',
      'layout',
      'images',
      'conditions',
      'unassigned',
      'skipped',
    ]);
    expect(result.images).toBe(4);
    expect(result.skipped.map((s) => path.basename(s.file))).toEqual([
      'notes.txt',
    ]);
    expect(result.conditions).toHaveLength(1);
    const condition = result.conditions[0]!;
    expect(condition.grid.files).toHaveLength(2);
    expect(condition.noGrid.exposureMas).toBe(10);
    const f = condition.analysis!.objects[0]!.figures;
    // PHYSICS.md §2 derived relations for Tp 0.70, Ts 0.10, SPR 4.
    const truth = gridFiguresFromComponents(0.7, 0.1, 4);
    for (const [estimate, value] of [
      [f.totalTransmission!, truth.totalTransmission],
      [f.contrastImprovementFactor, truth.contrastImprovementFactor],
      [f.snrImprovementFactor!, truth.snrImprovementFactor],
      [f.scatterToPrimaryRatio!, 4],
      [f.scatterTransmission!, 0.1],
    ] as const) {
      expect(estimate.ci95.low).toBeLessThanOrEqual(value);
      expect(estimate.ci95.high).toBeGreaterThanOrEqual(value);
      expect(Object.keys(estimate)).toEqual([
        'value',
        'standardError',
        'degreesOfFreedom',
        'ci95',
        'basis',
        'n',
        'replicateSampleSd',
      ]);
    }
    expect(f.verdict!.outcome).toBe('benefit');
    expect(condition.analysis!.method).toEqual(
      expect.objectContaining({
        cnrDefinition: 'background-sd',
        doseMeasure: 'mas',
        detrend: 'none',
      }),
    );
    expect(condition.analysis!.legacyConversion!.table).toContain('Bushong');
  });

  it('writes one CSV row per figure and a readable report', () => {
    const csv = runLamella(['analyze', session, '--layout', LAYOUT, '--csv']);
    const text = runLamella([
      'analyze',
      session,
      '--layout',
      LAYOUT,
      '--detrend',
      'plane',
    ]);

    expect(csv.status, csv.stderr).toBe(0);
    const rows = parse(csv.stdout, { columns: true }) as Array<
      Record<string, string>
    >;
    expect(Object.keys(rows[0]!)).toEqual([
      'station',
      'kvp',
      'thicknessMm',
      'grid',
      'gridExposureMas',
      'noGridExposureMas',
      'object',
      'figure',
      'value',
      'standardError',
      'ciLow',
      'ciHigh',
      'degreesOfFreedom',
      'basis',
      'images',
    ]);
    const sif = rows.find(
      (r) => r.figure === 'SNR improvement factor at equal dose',
    )!;
    expect(Number(sif.ciLow)).toBeLessThan(Number(sif.value));
    expect(Number(sif.ciHigh)).toBeGreaterThan(Number(sif.value));
    expect(text.status, text.stderr).toBe(0);
    expect(text.stdout).toContain('At equal dose the grid improves CNR by');
    expect(text.stdout).toContain('detrend plane');
  });

  it('fails with exit 2 and the error object when nothing can be analysed', () => {
    const missing = runLamella([
      'analyze',
      path.join(workDir, 'nope'),
      '--layout',
      LAYOUT,
      '--json',
    ]);
    const oneSide = runLamella([
      'analyze',
      path.join(workDir, 'only-no-grid'),
      '--layout',
      LAYOUT,
      '--json',
    ]);
    const noLayout = runLamella(['analyze', session, '--json']);

    for (const [run, code] of [
      [missing, 'file_unreadable'],
      [oneSide, 'analysis_failed'],
      [noLayout, 'usage'],
    ] as const) {
      expect(run.status).toBe(2);
      const body = JSON.parse(run.stdout) as {
        error: { code: string; message: string };
      };
      expect(Object.keys(body.error)).toEqual(['code', 'message']);
      expect(body.error.code).toBe(code);
      expect(run.stderr).toMatch(/^lamella analyze: /);
    }
  });
});
