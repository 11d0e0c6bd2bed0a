import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { pixelHistogram } from '../../../shared/analysis/pixel-histogram.ts';
import type { Region } from '../../../shared/roi/region-geometry.ts';
import { regionSpans } from '../../../shared/roi/region-mask.ts';
import { createSeededRandom } from '../../../server/synthetic/seeded-random.ts';
import {
  requireReferencePython,
  runReferenceScript,
} from '../../helpers/dicom-reference-python.ts';

const COLUMNS = 301;
const ROWS = 203;
const workDir = mkdtempSync(path.join(tmpdir(), 'lamella-histogram-'));
afterAll(() => rmSync(workDir, { recursive: true, force: true }));

function randomPixels<T extends Uint16Array | Int16Array>(
  array: T,
  spread: number,
  centre: number,
): T {
  const random = createSeededRandom(5);
  for (let i = 0; i < array.length; i += 1) {
    array[i] = Math.round(centre + spread * random.normal());
  }
  return array;
}

describe('pixel histogram', () => {
  const unsigned = randomPixels(new Uint16Array(COLUMNS * ROWS), 9000, 30000);
  const signed = randomPixels(new Int16Array(COLUMNS * ROWS), 6000, -2000);
  const ring: Region = {
    shape: 'ring',
    cx: 150,
    cy: 100,
    rInner: 20,
    rOuter: 90,
  };
  const whole: Region = { shape: 'rect', x0: 0, y0: 0, w: COLUMNS, h: ROWS };

  it('agrees with numpy.histogram on 16-bit unsigned and signed data', () => {
    requireReferencePython(['numpy']);
    const files = [
      ['u16.raw', unsigned, 'uint16'],
      ['i16.raw', signed, 'int16'],
    ] as const;
    const images = files.map(([name, pixels, dtype]) => {
      const file = path.join(workDir, name);
      writeFileSync(
        file,
        Buffer.from(pixels.buffer, pixels.byteOffset, pixels.byteLength),
      );
      return { path: file, dtype, columns: COLUMNS, rows: ROWS };
    });
    const cases = [
      { image: 0, region: whole, bins: 4096, rangeMin: 0, rangeMax: 65536 },
      { image: 0, region: ring, bins: 256, rangeMin: 0, rangeMax: 65536 },
      { image: 1, region: ring, bins: 512, rangeMin: -32768, rangeMax: 32768 },
    ];

    const reference = runReferenceScript<{ histograms: number[][] }>(
      'numpy_analysis.py',
      [],
      {
        images,
        histograms: cases,
      },
    );

    cases.forEach((c, i) => {
      const pixels = c.image === 0 ? unsigned : signed;
      const result = pixelHistogram(
        pixels,
        COLUMNS,
        regionSpans(c.region, COLUMNS, ROWS),
        c,
      );
      // tests/reference/numpy_analysis.py (numpy.histogram with the same bins and range).
      expect(Array.from(result.counts)).toEqual(reference.histograms[i]);
      expect(result.n).toBe(regionSpans(c.region, COLUMNS, ROWS).pixelCount);
    });
  });

  it('puts values outside the range into the end bins and skips non-finite ones', () => {
    const pixels = new Float64Array([-5, 0, 0.5, 1.5, 9, Number.NaN]);
    const spans = regionSpans(
      { shape: 'rect', x0: 0, y0: 0, w: 6, h: 1 },
      6,
      1,
    );

    const result = pixelHistogram(pixels, 6, spans, {
      bins: 2,
      rangeMin: 0,
      rangeMax: 2,
    });

    expect(Array.from(result.counts)).toEqual([3, 2]);
    expect(result.binWidth).toBe(1);
  });

  it('refuses a bad bin count or range', () => {
    const spans = regionSpans(
      { shape: 'rect', x0: 0, y0: 0, w: 2, h: 1 },
      2,
      1,
    );
    expect(() =>
      pixelHistogram(new Uint16Array(2), 2, spans, {
        bins: 0,
        rangeMin: 0,
        rangeMax: 1,
      }),
    ).toThrow(expect.objectContaining({ code: 'validation_failed' }));
    expect(() =>
      pixelHistogram(new Uint16Array(2), 2, spans, {
        bins: 4,
        rangeMin: 5,
        rangeMax: 5,
      }),
    ).toThrow(expect.objectContaining({ code: 'validation_failed' }));
  });
});
