import { describe, expect, it } from 'vitest';
import { comparePair } from '../../../server/analysis/pair-comparison.service.ts';
import { parseRegionSpec } from '../../../shared/roi/region-geometry.ts';
import { regionStatistics } from '../../../shared/roi/region-statistics.ts';
import { TEST_GRID, decodedPhantom, slabSpec } from './synthetic-images.ts';

const OBJECT = {
  spec: 'circle:80,80,22',
  region: parseRegionSpec('circle:80,80,22'),
};
const BACKGROUND = {
  spec: 'ring:80,80,32,60',
  region: parseRegionSpec('ring:80,80,32,60'),
};

describe('pair comparison', () => {
  it('normalises transmissions per mAs and computes SIF with D = mAs or DAP', async () => {
    const gridImage = await decodedPhantom(
      slabSpec({ seed: 1, grid: TEST_GRID, exposureMas: 20 }),
    );
    const noGridImage = await decodedPhantom(
      slabSpec({ seed: 2, exposureMas: 10 }),
    );

    const byMas = comparePair({
      gridImage,
      noGridImage,
      object: OBJECT,
      background: BACKGROUND,
    });
    const byDap = comparePair({
      gridImage,
      noGridImage,
      object: OBJECT,
      background: BACKGROUND,
      doseMeasure: 'dap',
    });

    const mean = (image: typeof gridImage, region: typeof OBJECT) =>
      regionStatistics(image.pixels, image.columns, image.rows, region.region)
        .stats.mean;
    const tt =
      mean(gridImage, BACKGROUND) / 20 / (mean(noGridImage, BACKGROUND) / 10);
    expect(byMas.totalTransmission).toBeCloseTo(tt, 12);
    expect(byMas.buckyFactor).toBeCloseTo(1 / tt, 12);
    expect(byMas.snrImprovementFactor).toBeCloseTo(
      byMas.grid.cnr / Math.sqrt(20) / (byMas.noGrid.cnr / Math.sqrt(10)),
      12,
    );
    expect(byMas.doseSaving).toBeCloseTo(
      1 - 1 / byMas.snrImprovementFactor! ** 2,
      12,
    );
    // The synthetic DAP is proportional to mAs, so the SIF is the same.
    expect(byDap.snrImprovementFactor).toBeCloseTo(
      byMas.snrImprovementFactor!,
      10,
    );
    expect(byMas.grid.object).toEqual(
      expect.objectContaining({
        roi: 'circle:80,80,22',
        n: expect.any(Number),
        median: expect.any(Number),
      }),
    );
  });

  it('gives null figures with a warning when the dose measure is missing', async () => {
    const gridImage = await decodedPhantom(
      slabSpec({ seed: 3, grid: TEST_GRID }),
    );
    const noGridImage = await decodedPhantom(slabSpec({ seed: 4 }));

    const result = comparePair({
      gridImage,
      noGridImage,
      object: OBJECT,
      background: BACKGROUND,
      doseMeasure: 'entrance',
    });

    expect(result.snrImprovementFactor).toBeNull();
    expect(result.doseSaving).toBeNull();
    expect(result.totalTransmission).not.toBeNull();
    expect(result.warnings.map((w) => w.code)).toContain('dose_missing');
  });

  it('refuses an object region outside the image', async () => {
    const image = await decodedPhantom(slabSpec({ seed: 5 }));

    expect(() =>
      comparePair({
        gridImage: image,
        noGridImage: image,
        object: {
          spec: 'circle:900,900,5',
          region: parseRegionSpec('circle:900,900,5'),
        },
        background: BACKGROUND,
      }),
    ).toThrow(expect.objectContaining({ code: 'region_empty' }));
  });
});
