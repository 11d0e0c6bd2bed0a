import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import {
  max as ssMax,
  mean as ssMean,
  median as ssMedian,
  min as ssMin,
  sampleStandardDeviation,
  standardDeviation,
} from 'simple-statistics';
import { afterAll, describe, expect, it } from 'vitest';
import type { Region } from '../../../shared/roi/region-geometry.ts';
import type {
  PixelArray,
  RegionStatistics,
} from '../../../shared/roi/region-statistics.ts';
import { regionStatistics } from '../../../shared/roi/region-statistics.ts';
import {
  requireReferencePython,
  runReferenceScript,
} from '../../helpers/dicom-reference-python.ts';

/** Deterministic uniform [0, 1) generator (mulberry32), so cases repeat. */
function random(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

const whole = (columns: number, rows: number): Region => ({
  shape: 'rect',
  x0: 0,
  y0: 0,
  w: columns,
  h: rows,
});

describe('regionStatistics on hand-checkable matrices', () => {
  it('gives mean 5, SDs √7.5 and √(60/9) for the 3×3 matrix 1…9', () => {
    const pixels = new Uint16Array([1, 2, 3, 4, 5, 6, 7, 8, 9]);

    const { stats, warnings } = regionStatistics(pixels, 3, 3, whole(3, 3));

    // Σ(x − 5)² = 60 over 9 values (hand-checked).
    expect(stats).toMatchObject({ n: 9, mean: 5, min: 1, max: 9, median: 5 });
    expect(stats.sampleSd).toBeCloseTo(Math.sqrt(60 / 8), 14);
    expect(stats.populationSd).toBeCloseTo(Math.sqrt(60 / 9), 14);
    expect(warnings).toEqual([]);
  });

  it('measures only the masked pixels of a circle', () => {
    // 4×4 image, circle:2,2,1 holds the middle 2×2 block: 6, 7, 10, 11.
    const pixels = new Uint8Array(16).map((_, i) => i + 1);

    const { stats } = regionStatistics(pixels, 4, 4, {
      shape: 'circle',
      cx: 2,
      cy: 2,
      r: 1,
    });

    expect(stats).toMatchObject({ n: 4, mean: 8.5, min: 6, max: 11 });
    expect(stats.median).toBe(8.5);
    // Deviations ±2.5, ±1.5: Σd² = 17 (hand-checked).
    expect(stats.populationSd).toBeCloseTo(Math.sqrt(17 / 4), 14);
  });

  it('handles signed 16-bit data', () => {
    const pixels = new Int16Array([-32768, -3, -1, 1, 3, 32767]);

    const { stats } = regionStatistics(pixels, 3, 2, {
      shape: 'rect',
      x0: 1,
      y0: 0,
      w: 2,
      h: 2,
    });

    // Columns 1–2 of rows 0–1 of [[−32768, −3, −1], [1, 3, 32767]].
    expect(stats).toMatchObject({ n: 4, min: -3, max: 32767, median: 1 });
    expect(stats.mean).toBe((-3 - 1 + 3 + 32767) / 4);
  });

  it('gives n 1, sample SD 0 and a warning for a single pixel', () => {
    const pixels = new Int16Array([10, -20, 30, 40]);

    const { stats, warnings } = regionStatistics(pixels, 2, 2, {
      shape: 'rect',
      x0: 1,
      y0: 0,
      w: 1,
      h: 1,
    });

    expect(stats).toMatchObject({
      n: 1,
      mean: -20,
      min: -20,
      max: -20,
      median: -20,
      sampleSd: 0,
      populationSd: 0,
    });
    expect(warnings.map((w) => w.code)).toEqual(['single_pixel_region']);
  });

  it('throws region_empty for a region outside the image', () => {
    expect(() =>
      regionStatistics(new Uint16Array(16), 4, 4, {
        shape: 'circle',
        cx: 40,
        cy: 40,
        r: 3,
      }),
    ).toThrow(expect.objectContaining({ code: 'region_empty' }));
  });

  it('warns region_clipped for a region over the edge and measures the inside', () => {
    const pixels = new Uint16Array([1, 2, 3, 4]);

    const { stats, warnings } = regionStatistics(pixels, 2, 2, {
      shape: 'rect',
      x0: 1,
      y0: -1,
      w: 5,
      h: 2,
    });

    expect(stats).toMatchObject({ n: 1, mean: 2 });
    expect(warnings.map((w) => w.code)).toContain('region_clipped');
  });

  it('leaves out non-finite float values with a warning', () => {
    const pixels = new Float32Array([
      1,
      Number.NaN,
      3,
      Number.POSITIVE_INFINITY,
    ]);

    const { stats, warnings } = regionStatistics(pixels, 2, 2, whole(2, 2));

    expect(stats).toMatchObject({ n: 2, mean: 2, min: 1, max: 3, median: 2 });
    expect(warnings.map((w) => w.code)).toEqual(['non_finite_pixels']);
  });

  it('applies a linearisation table before every statistic', () => {
    // signal = table[v + 1]; v ∈ {−1, 0, 1, 2} → 10, 20, 30, 40.
    const table = new Float64Array([10, 20, 30, 40]);
    const pixels = new Int16Array([-1, 0, 1, 2]);

    const { stats } = regionStatistics(pixels, 2, 2, whole(2, 2), {
      lut: { table, offset: 1 },
    });

    expect(stats).toMatchObject({
      n: 4,
      mean: 25,
      min: 10,
      max: 40,
      median: 25,
    });
  });

  it('rejects a table that does not cover the data', () => {
    expect(() =>
      regionStatistics(new Uint16Array([0, 5]), 2, 1, whole(2, 1), {
        lut: { table: new Float64Array(3), offset: 0 },
      }),
    ).toThrow(expect.objectContaining({ code: 'validation_failed' }));
  });

  it('rejects a percentile outside 0–100 and a short buffer', () => {
    expect(() =>
      regionStatistics(new Uint16Array(4), 2, 2, whole(2, 2), {
        percentiles: [101],
      }),
    ).toThrow(expect.objectContaining({ code: 'validation_failed' }));
    expect(() =>
      regionStatistics(new Uint16Array(3), 2, 2, whole(2, 2)),
    ).toThrow(expect.objectContaining({ code: 'validation_failed' }));
  });
});

describe('regionStatistics against simple-statistics', () => {
  const makers: Array<[string, (n: number, r: () => number) => PixelArray]> = [
    ['Uint16', (n, r) => Uint16Array.from({ length: n }, () => r() * 65536)],
    [
      'Int16',
      (n, r) => Int16Array.from({ length: n }, () => r() * 65536 - 32768),
    ],
    ['Uint8', (n, r) => Uint8Array.from({ length: n }, () => r() * 256)],
    ['Int32', (n, r) => Int32Array.from({ length: n }, () => r() * 4e9 - 2e9)],
    [
      'Float32',
      (n, r) => Float32Array.from({ length: n }, () => r() * 1000 - 500),
    ],
  ];

  it.each(makers)('agrees on whole small %s images', (_name, make) => {
    for (let seed = 1; seed <= 20; seed += 1) {
      const r = random(seed);
      const columns = 1 + Math.floor(r() * 9);
      const rows = 1 + Math.floor(r() * 9);
      const pixels = make(columns * rows, r);
      const values = Array.from(pixels, Number);

      const { stats } = regionStatistics(
        pixels,
        columns,
        rows,
        whole(columns, rows),
      );

      // simple-statistics 7.12 (npm), an independent implementation.
      expect(stats.n).toBe(values.length);
      expect(stats.mean).toBeCloseTo(ssMean(values), 6);
      expect(stats.populationSd).toBeCloseTo(standardDeviation(values), 6);
      if (values.length > 1) {
        expect(stats.sampleSd).toBeCloseTo(sampleStandardDeviation(values), 6);
      }
      expect(stats.median).toBe(ssMedian(values));
      expect(stats.min).toBe(ssMin(values));
      expect(stats.max).toBe(ssMax(values));
    }
  });
});

describe('regionStatistics against numpy (tests/reference/numpy_roi.py)', () => {
  const dir = mkdtempSync(path.join(tmpdir(), 'lamella-roi-'));
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  function writeRaw(name: string, array: PixelArray | Float64Array): string {
    const file = path.join(dir, name);
    writeFileSync(
      file,
      new Uint8Array(array.buffer, array.byteOffset, array.byteLength),
    );
    return file;
  }

  function compare(actual: RegionStatistics, expected: RegionStatistics): void {
    const close = (a: number, b: number): void => {
      expect(Math.abs(a - b)).toBeLessThanOrEqual(
        1e-9 * Math.max(1, Math.abs(b)),
      );
    };
    expect(actual.n).toBe(expected.n);
    close(actual.mean, expected.mean);
    close(actual.sampleSd, expected.sampleSd);
    close(actual.populationSd, expected.populationSd);
    expect(actual.min).toBe(expected.min);
    expect(actual.max).toBe(expected.max);
    close(actual.median, expected.median);
    expect(Object.keys(actual.percentiles)).toEqual(
      Object.keys(expected.percentiles),
    );
    for (const key of Object.keys(expected.percentiles)) {
      close(actual.percentiles[key]!, expected.percentiles[key]!);
    }
  }

  it('matches numpy for random regions on 16-bit, signed, 32-bit, float and linearised data', () => {
    requireReferencePython(['numpy']);
    const r = random(2024);
    const columns = 97;
    const rows = 61;
    const size = columns * rows;
    // Smooth signal plus noise, like a phantom image, and a few extremes.
    const u16 = Uint16Array.from({ length: size }, (_, i) =>
      Math.min(65535, 2000 + (i % columns) * 7 + Math.floor(r() * 300)),
    );
    u16[5] = 65535;
    u16[6] = 0;
    const i16 = Int16Array.from(
      { length: size },
      () => Math.floor(r() * 4096) - 2048,
    );
    const i32 = Int32Array.from(
      { length: size },
      () => Math.floor(r() * 2e6) - 1e6,
    );
    const f32 = Float32Array.from({ length: size }, () => (r() - 0.5) * 1e4);
    const images: Array<{ array: PixelArray; dtype: string }> = [
      { array: u16, dtype: 'uint16' },
      { array: i16, dtype: 'int16' },
      { array: i32, dtype: 'int32' },
      { array: f32, dtype: 'float32' },
    ];
    // A non-monotonic table for the signed image: signal = cos(v/300)·v.
    const table = Float64Array.from(
      { length: 4096 },
      (_, k) => Math.cos((k - 2048) / 300) * (k - 2048),
    );
    const lutPath = writeRaw('lut.f64', table);
    const regions: Region[] = [
      whole(columns, rows),
      { shape: 'circle', cx: 48.5, cy: 30.5, r: 20 },
      { shape: 'circle', cx: 3.3, cy: 2.1, r: 9.7 },
      { shape: 'rect', x0: 10, y0: 5, w: 33, h: 17 },
      { shape: 'rect', x0: 90.5, y0: 50.2, w: 30, h: 30 },
      { shape: 'ring', cx: 50, cy: 30, rInner: 8, rOuter: 25 },
      {
        shape: 'polygon',
        points: [
          [5, 5],
          [80.3, 12.7],
          [60, 58],
          [30, 20],
          [10.5, 50],
        ],
      },
    ];
    for (let k = 0; k < 8; k += 1) {
      regions.push({
        shape: 'circle',
        cx: r() * columns,
        cy: r() * rows,
        r: 1 + r() * 30,
      });
    }
    const percentiles = [0, 0.5, 5, 25, 33.3, 75, 95, 99.5, 100];
    const cases: Array<{
      image: number;
      region: Region;
      percentiles: number[];
      lut: { path: string; offset: number } | null;
    }> = [];
    images.forEach((_, image) => {
      for (const region of regions)
        cases.push({ image, region, percentiles, lut: null });
    });
    for (const region of regions) {
      cases.push({
        image: 1,
        region,
        percentiles,
        lut: { path: lutPath, offset: 2048 },
      });
    }

    const expected = runReferenceScript<RegionStatistics[]>(
      'numpy_roi.py',
      [],
      {
        images: images.map(({ array, dtype }, i) => ({
          path: writeRaw(`image-${i}.raw`, array),
          dtype,
          columns,
          rows,
        })),
        cases,
      },
    );

    cases.forEach((c, i) => {
      const { stats } = regionStatistics(
        images[c.image]!.array,
        columns,
        rows,
        c.region,
        {
          percentiles,
          lut: c.lut ? { table, offset: c.lut.offset } : undefined,
        },
      );
      compare(stats, expected[i]!);
    });
  });

  it('is exact for 10⁷ 16-bit pixels where Σx² passes 2⁵³', () => {
    requireReferencePython(['numpy']);
    const columns = 4000;
    const rows = 2500;
    const pixels = new Uint16Array(columns * rows);
    const r = random(7);
    for (let i = 0; i < pixels.length; i += 1) {
      pixels[i] = r() < 0.5 ? 65535 - Math.floor(r() * 3) : Math.floor(r() * 3);
    }
    // Exact integer arithmetic (BigInt) as the first reference.
    let sum = 0n;
    let sumSquares = 0n;
    for (const v of pixels) {
      sum += BigInt(v);
      sumSquares += BigInt(v) * BigInt(v);
    }
    const n = BigInt(pixels.length);
    expect(Number(sumSquares)).toBeGreaterThan(2 ** 53);
    const exactSampleVariance =
      Number(n * sumSquares - sum * sum) / Number(n * (n - 1n));

    const { stats } = regionStatistics(
      pixels,
      columns,
      rows,
      whole(columns, rows),
      {
        percentiles: [50],
      },
    );

    expect(stats.mean).toBe(Number(sum) / pixels.length);
    expect(
      Math.abs(stats.sampleSd ** 2 - exactSampleVariance) / exactSampleVariance,
    ).toBeLessThan(1e-14);
    // numpy (tests/reference/numpy_roi.py) as the second.
    const [fromNumpy] = runReferenceScript<RegionStatistics[]>(
      'numpy_roi.py',
      [],
      {
        images: [
          { path: writeRaw('big.raw', pixels), dtype: 'uint16', columns, rows },
        ],
        cases: [
          {
            image: 0,
            region: whole(columns, rows),
            percentiles: [50],
            lut: null,
          },
        ],
      },
    );
    compare(stats, fromNumpy!);
  });
});
