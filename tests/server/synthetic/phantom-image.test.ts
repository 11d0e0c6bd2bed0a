import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { readDicomFile } from '../../../server/dicom/decode-dicom.ts';
import type { PhantomSpec } from '../../../server/synthetic/phantom-image.ts';
import {
  phantomTruth,
  pixelValueForKerma,
  renderPhantomImage,
} from '../../../server/synthetic/phantom-image.ts';
import { writePhantomSession } from '../../../server/synthetic/phantom-session.ts';
import { createSeededRandom } from '../../../server/synthetic/seeded-random.ts';
import { regionStatistics } from '../../../shared/roi/region-statistics.ts';

const SPEC: PhantomSpec = {
  columns: 128,
  rows: 96,
  seed: 7,
  pixelSpacingMm: 0.15,
  exposureMas: 8,
  primaryKermaUgyPerMas: 0.5,
  scatterToPrimaryRatio: 3,
  grid: null,
  kermaPerQuantumUgy: 0.001,
  object: { cx: 64, cy: 48, radiusPx: 20, primaryContrast: 0.2 },
  response: { model: 'linear', offset: 50, gainPerUgy: 1000 },
};

const workDir = mkdtempSync(path.join(tmpdir(), 'lamella-phantom-'));
afterAll(() => rmSync(workDir, { recursive: true, force: true }));

describe('seeded random numbers', () => {
  it('repeat for a seed and give standard normal deviates', () => {
    const a = createSeededRandom(42);
    const b = createSeededRandom(42);
    const first = Array.from({ length: 5 }, () => a.uniform());
    expect(Array.from({ length: 5 }, () => b.uniform())).toEqual(first);
    expect(createSeededRandom(43).uniform()).not.toBe(first[0]);

    const r = createSeededRandom(1);
    let sum = 0;
    let sumSquares = 0;
    const n = 200_000;
    for (let i = 0; i < n; i += 1) {
      const z = r.normal();
      sum += z;
      sumSquares += z * z;
    }
    expect(Math.abs(sum / n)).toBeLessThan(0.01);
    expect(sumSquares / n).toBeGreaterThan(0.98);
    expect(sumSquares / n).toBeLessThan(1.02);
  });
});

describe('synthetic phantom image', () => {
  it('is deterministic for a seed and differs between seeds', () => {
    expect(renderPhantomImage(SPEC)).toEqual(renderPhantomImage(SPEC));
    expect(renderPhantomImage({ ...SPEC, seed: 8 })).not.toEqual(
      renderPhantomImage(SPEC),
    );
  });

  it('has the mean and Poisson noise of its known primary and scatter', () => {
    const pixels = renderPhantomImage({
      ...SPEC,
      grid: { primaryTransmission: 0.7, scatterTransmission: 0.1 },
    });
    const truth = phantomTruth({
      ...SPEC,
      grid: { primaryTransmission: 0.7, scatterTransmission: 0.1 },
    });

    const background = regionStatistics(pixels, 128, 96, {
      shape: 'rect',
      x0: 0,
      y0: 0,
      w: 30,
      h: 96,
    }).stats;
    const object = regionStatistics(pixels, 128, 96, {
      shape: 'circle',
      cx: 64,
      cy: 48,
      r: 15,
    }).stats;

    expect(truth.primaryUgy).toBeCloseTo(4 * 0.7, 12);
    expect(truth.scatterUgy).toBeCloseTo(12 * 0.1, 12);
    expect(background.mean).toBeCloseTo(50 + 1000 * truth.totalUgy, -1);
    expect(object.mean).toBeCloseTo(50 + 1000 * truth.objectTotalUgy, -1);
    const sdTruth = 1000 * Math.sqrt(0.001 * truth.totalUgy);
    expect(background.sampleSd / sdTruth).toBeGreaterThan(0.95);
    expect(background.sampleSd / sdTruth).toBeLessThan(1.05);
  });

  it('holds only reduced scatter behind a lead disc', () => {
    const spec = {
      ...SPEC,
      kermaPerQuantumUgy: 0,
      leadDiscs: [{ cx: 20, cy: 20, diameterMm: 6 }],
    };
    const pixels = renderPhantomImage(spec);

    const shadow = regionStatistics(pixels, 128, 96, {
      shape: 'circle',
      cx: 20,
      cy: 20,
      r: 5,
    }).stats;

    expect(shadow.mean).toBeCloseTo(
      50 + 1000 * phantomTruth(spec).scatterBehindDiscUgy(6),
      0,
    );
    expect(shadow.sampleSd).toBe(0);
  });

  it('applies logarithmic and power responses and clips to Bits Stored', () => {
    expect(
      pixelValueForKerma({ model: 'logarithmic', a: 100, b: 200 }, Math.E),
    ).toBeCloseTo(300, 12);
    expect(
      pixelValueForKerma({ model: 'power', a: 10, b: 0.5 }, 4),
    ).toBeCloseTo(20, 12);
    const clipped = renderPhantomImage({
      ...SPEC,
      bitsStored: 12,
      kermaPerQuantumUgy: 0,
    });
    expect(Math.max(...clipped)).toBe(4095);
  });

  it('refuses an impossible spec', () => {
    expect(() => renderPhantomImage({ ...SPEC, columns: 0 })).toThrow(
      expect.objectContaining({ code: 'validation_failed' }),
    );
    expect(() =>
      renderPhantomImage({ ...SPEC, scatterToPrimaryRatio: -1 }),
    ).toThrow(expect.objectContaining({ code: 'validation_failed' }));
  });
});

describe('synthetic phantom session', () => {
  it('writes DICOM files whose headers carry the acquisition and exposure index', async () => {
    const plan = {
      stationName: 'SGH-DR2',
      kvp: 81,
      bodyPartThicknessMm: 200,
      sidMm: 1150,
      gridId: 'SGH-G12',
      gridAspectRatio: [12, 1] as [number, number],
      gridFocalDistanceMm: 1150,
      dapDgyCm2PerMas: 0.08,
      exposures: [
        { fileName: 'no-grid.dcm', spec: SPEC },
        {
          fileName: 'grid.dcm',
          spec: {
            ...SPEC,
            seed: 9,
            exposureMas: 12.5,
            grid: { primaryTransmission: 0.7, scatterTransmission: 0.1 },
          },
        },
      ],
    };
    const files = await writePhantomSession(
      path.join(workDir, 'session'),
      plan,
    );
    const again = await writePhantomSession(path.join(workDir, 'again'), plan);

    const noGrid = await readDicomFile(files[0]!);
    const grid = await readDicomFile(files[1]!);

    expect(noGrid.pixels).toEqual(renderPhantomImage(SPEC));
    expect(noGrid.acquisition).toEqual(
      expect.objectContaining({
        kvp: 81,
        exposureMas: 8,
        exposureMasSource: 'ExposureInuAs',
        grid: ['NONE'],
        stationName: 'SGH-DR2',
        bodyPartThicknessMm: 200,
        presentationIntentType: 'FOR PROCESSING',
        pixelIntensityRelationship: 'LIN',
        imagerPixelSpacingMm: { rowMm: 0.15, columnMm: 0.15 },
        targetExposureIndex: 400,
      }),
    );
    // IEC 62494-1: EI = 100 × detector air kerma in µGy (16 µGy here).
    expect(noGrid.acquisition.exposureIndex).toBeCloseTo(
      100 * phantomTruth(SPEC).totalUgy,
      6,
    );
    expect(grid.acquisition).toEqual(
      expect.objectContaining({
        grid: ['FOCUSED'],
        exposureMas: 12.5,
        gridId: 'SGH-G12',
        gridAspectRatio: [12, 1],
      }),
    );
    expect(grid.acquisition.dapDgyCm2).toBeCloseTo(1, 10);
    expect(noGrid.warnings.map((w) => w.code)).toEqual([]);
    expect(readFileSync(again[1]!)).toEqual(readFileSync(files[1]!));
  });
});
