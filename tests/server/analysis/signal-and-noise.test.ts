import { describe, expect, it } from 'vitest';
import { analyseCondition } from '../../../server/analysis/condition-analysis.service.ts';
import {
  phantomTruth,
  renderPhantomImage,
} from '../../../server/synthetic/phantom-image.ts';
import { fitDetectorCalibration } from '../../../shared/analysis/detector-calibration.ts';
import type { Estimate } from '../../../shared/analysis/estimate.ts';
import { parseRegionLayout } from '../../../shared/analysis/region-layout.ts';
import { gridFiguresFromComponents } from '../../../shared/physics/grid-figures.ts';
import { regionStatistics } from '../../../shared/roi/region-statistics.ts';
import {
  SLAB_LAYOUT,
  TEST_GRID,
  decodedPhantom,
  slabSpec,
} from './synthetic-images.ts';

// PHYSICS.md §2 derived relations for Tp 0.70, Ts 0.10, SPR 4.
const TRUTH = gridFiguresFromComponents(0.7, 0.1, 4);

const within = (e: Estimate | null, truth: number, k = 3): boolean =>
  e !== null && Math.abs(e.value - truth) <= k * e.standardError;

describe('signal domain of the analysis', () => {
  const logResponse = { model: 'logarithmic' as const, a: 2000, b: 3000 };

  it('linearises LOG data with a calibration fitted from flat fields, and drops the LOG warning', async () => {
    const points = [2, 5, 10, 20, 40].map((mas, i) => {
      const spec = slabSpec({
        seed: 500 + i,
        exposureMas: mas,
        object: null,
        response: logResponse,
      });
      const { stats } = regionStatistics(renderPhantomImage(spec), 160, 160, {
        shape: 'rect',
        x0: 40,
        y0: 40,
        w: 80,
        h: 80,
      });
      return {
        airKermaUgy: phantomTruth(spec).totalUgy,
        meanPixelValue: stats.mean,
      };
    });
    const calibration = fitDetectorCalibration(points);
    const grid = await decodedPhantom(
      slabSpec({ seed: 31, grid: TEST_GRID, response: logResponse }),
    );
    const noGrid = await decodedPhantom(
      slabSpec({ seed: 32, response: logResponse }),
    );

    const raw = analyseCondition({
      gridImages: [grid],
      noGridImages: [noGrid],
      layout: SLAB_LAYOUT,
    });
    const linear = analyseCondition({
      gridImages: [grid],
      noGridImages: [noGrid],
      layout: SLAB_LAYOUT,
      options: { calibration: calibration.chosen },
    });

    expect(calibration.chosen.model).toBe('logarithmic');
    expect(raw.images.grid[0]!.warnings.map((w) => w.code)).toContain(
      'log_relationship_uncalibrated',
    );
    expect(raw.objects[0]!.figures.totalTransmission!.value).toBeGreaterThan(
      0.5,
    );
    const f = linear.objects[0]!.figures;
    expect(linear.method.signalMethod).toBe('calibrated-logarithmic');
    expect(linear.images.grid[0]!.warnings.map((w) => w.code)).not.toContain(
      'log_relationship_uncalibrated',
    );
    // PHYSICS.md §2 derived relations.
    expect(within(f.totalTransmission, TRUTH.totalTransmission)).toBe(true);
    expect(
      within(f.contrastImprovementFactor, TRUTH.contrastImprovementFactor),
    ).toBe(true);
    expect(within(f.snrImprovementFactor, TRUTH.snrImprovementFactor)).toBe(
      true,
    );
  });

  it('takes (2^16 − 1) − value as signal for Sign −1 data, as the ingest warning says', async () => {
    const inverted = {
      model: 'linear' as const,
      offset: 65535,
      gainPerUgy: -1000,
    };
    const sign = { PixelIntensityRelationshipSign: -1 };
    const grid = await decodedPhantom(
      slabSpec({ seed: 41, grid: TEST_GRID, response: inverted }),
      sign,
    );
    const noGrid = await decodedPhantom(
      slabSpec({ seed: 42, response: inverted }),
      sign,
    );

    const result = analyseCondition({
      gridImages: [grid],
      noGridImages: [noGrid],
      layout: SLAB_LAYOUT,
    });

    expect(result.method.signalMethod).toBe('inverted-stored-values');
    expect(result.images.noGrid[0]!.warnings.map((w) => w.code)).toContain(
      'inverted_sign',
    );
    const f = result.objects[0]!.figures;
    expect(within(f.totalTransmission, TRUTH.totalTransmission)).toBe(true);
    expect(within(f.snrImprovementFactor, TRUTH.snrImprovementFactor)).toBe(
      true,
    );
  });
});

describe('background trend and replicate noise', () => {
  it('removes a heel-effect ramp with the plane fit: CNR back at its analytic value', async () => {
    const layout = parseRegionLayout({
      name: 'side backgrounds',
      regions: [
        { name: 'disc', role: 'object', spec: 'circle:80,80,22' },
        { name: 'left', role: 'background', spec: 'rect:10,40,40,80' },
        { name: 'right', role: 'background', spec: 'rect:110,40,40,80' },
      ],
    });
    const heel = { heelGradientPerPx: 0.004 };
    const image = await decodedPhantom(slabSpec({ seed: 51, ...heel }));
    const other = await decodedPhantom(
      slabSpec({ seed: 52, grid: TEST_GRID, ...heel }),
    );

    const plain = analyseCondition({
      gridImages: [other],
      noGridImages: [image],
      layout,
    });
    const detrended = analyseCondition({
      gridImages: [other],
      noGridImages: [image],
      layout,
      options: { detrend: 'plane' },
    });

    // No grid at the disc: ΔS = 0.1·P = 500 PV, σ = 1000·√(0.002·25 µGy) PV.
    const cnrTruth = 500 / (1000 * Math.sqrt(0.002 * 25));
    const summary = detrended.objects[0]!.images.noGrid[0]!;
    expect(summary.backgroundSdAboutPlane!).toBeLessThan(
      0.7 * summary.backgroundSampleSd,
    );
    expect(within(detrended.objects[0]!.figures.noGrid.cnr, cnrTruth)).toBe(
      true,
    );
    expect(plain.objects[0]!.figures.noGrid.cnr.value).toBeLessThan(
      0.7 * cnrTruth,
    );
    expect(detrended.method.detrend).toBe('plane');
    expect(summary.figures.method.noiseSource).toBe(
      'sd-about-background-plane',
    );
  });

  it('takes noise from the replicate difference ÷ √2, which removes a grid-line pattern', async () => {
    const lines = { gridLinePattern: { periodPx: 3, amplitude: 0.05 } };
    const grid = await Promise.all(
      [61, 62].map((seed) =>
        decodedPhantom(slabSpec({ seed, grid: TEST_GRID, ...lines })),
      ),
    );
    const noGrid = await Promise.all(
      [63, 64].map((seed) => decodedPhantom(slabSpec({ seed }))),
    );

    const region = analyseCondition({
      gridImages: grid,
      noGridImages: noGrid,
      layout: SLAB_LAYOUT,
    });
    const difference = analyseCondition({
      gridImages: grid,
      noGridImages: noGrid,
      layout: SLAB_LAYOUT,
      options: { noise: 'replicate-difference' },
    });

    // Grid background noise: 1000·√(0.002·5.5 µGy) PV without the pattern.
    const noiseTruth = 1000 * Math.sqrt(0.002 * 5.5);
    const g = difference.objects[0]!.images.grid[0]!;
    expect(g.replicateDifferenceSd!).toBeGreaterThan(0.95 * noiseTruth);
    expect(g.replicateDifferenceSd!).toBeLessThan(1.05 * noiseTruth);
    expect(g.backgroundSampleSd).toBeGreaterThan(1.5 * noiseTruth);
    expect(
      difference.objects[0]!.figures.snrImprovementFactor!.value,
    ).toBeCloseTo(TRUTH.snrImprovementFactor, 1);
    expect(region.objects[0]!.figures.snrImprovementFactor!.value).toBeLessThan(
      0.8 * TRUTH.snrImprovementFactor,
    );
  });
});

describe('beam-stop series', () => {
  it('recovers SPR, Ts and Σ and predicts K beside the measured CIF', async () => {
    const layout = parseRegionLayout({
      name: 'beam stops',
      regions: [
        { name: 'disc', role: 'object', spec: 'circle:80,80,22' },
        { name: 'ring', role: 'background', spec: 'ring:80,80,32,45' },
        {
          name: 'lead-4',
          role: 'beam-stop',
          spec: 'circle:20,20,5',
          diameterMm: 4,
        },
        {
          name: 'lead-8',
          role: 'beam-stop',
          spec: 'circle:140,20,8',
          diameterMm: 8,
        },
        {
          name: 'lead-12',
          role: 'beam-stop',
          spec: 'circle:20,140,12',
          diameterMm: 12,
        },
      ],
    });
    const leadDiscs = [
      { cx: 20, cy: 20, diameterMm: 4 },
      { cx: 140, cy: 20, diameterMm: 8 },
      { cx: 20, cy: 140, diameterMm: 12 },
    ];
    const grid = await decodedPhantom(
      slabSpec({ seed: 81, leadDiscs, grid: TEST_GRID }),
    );
    const noGrid = await decodedPhantom(slabSpec({ seed: 82, leadDiscs }));

    const f = analyseCondition({
      gridImages: [grid],
      noGridImages: [noGrid],
      layout,
    }).objects[0]!.figures;

    // PHYSICS.md §2: SPR 4, SF 0.8, Ts 0.10, Σ 7.000, K 3.1818.
    expect(within(f.scatterToPrimaryRatio, 4)).toBe(true);
    expect(within(f.scatterFraction, 0.8)).toBe(true);
    expect(within(f.scatterTransmission, 0.1)).toBe(true);
    expect(within(f.selectivity, 7)).toBe(true);
    expect(
      within(
        f.predictedContrastImprovementFactor,
        TRUTH.contrastImprovementFactor,
      ),
    ).toBe(true);
    expect(f.method.scatterTransmissionSource).toBe('beam-stop');
  });

  it('uses a stated Ts for selectivity when there is no beam stop', async () => {
    const grid = await decodedPhantom(slabSpec({ seed: 91, grid: TEST_GRID }));
    const noGrid = await decodedPhantom(slabSpec({ seed: 92 }));

    const f = analyseCondition({
      gridImages: [grid],
      noGridImages: [noGrid],
      layout: SLAB_LAYOUT,
      options: { statedScatterTransmission: 0.1 },
    }).objects[0]!.figures;

    expect(f.method.scatterTransmissionSource).toBe('stated');
    expect(within(f.selectivity, 7)).toBe(true);
    expect(f.predictedContrastImprovementFactor).toBeNull();
  });
});

describe('finite output', () => {
  it('holds no NaN or Infinity anywhere in a full analysis', async () => {
    const images = await Promise.all(
      [1, 2, 3, 4].map((seed, i) =>
        decodedPhantom(
          slabSpec({
            seed: 300 + seed,
            grid: i < 2 ? TEST_GRID : null,
            heelGradientPerPx: 0.001,
          }),
        ),
      ),
    );
    const found: string[] = [];
    const scan = (value: unknown, where: string): void => {
      if (typeof value === 'number' && !Number.isFinite(value))
        found.push(where);
      else if (Array.isArray(value))
        value.forEach((v, i) => scan(v, `${where}[${i}]`));
      else if (
        value &&
        typeof value === 'object' &&
        !ArrayBuffer.isView(value)
      ) {
        for (const [k, v] of Object.entries(value)) scan(v, `${where}.${k}`);
      }
    };

    for (const options of [
      {},
      {
        detrend: 'plane' as const,
        noise: 'replicate-difference' as const,
        cnrDefinition: 'pooled-sd' as const,
      },
    ]) {
      scan(
        analyseCondition({
          gridImages: images.slice(0, 2),
          noGridImages: images.slice(2),
          layout: SLAB_LAYOUT,
          options,
        }),
        'result',
      );
    }

    expect(found).toEqual([]);
  });
});
