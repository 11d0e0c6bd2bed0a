import { describe, expect, it } from 'vitest';
import type { Region } from '../../../shared/roi/region-geometry.ts';
import { regionStatistics } from '../../../shared/roi/region-statistics.ts';
import { createSeededRandom } from '../../../server/synthetic/seeded-random.ts';

// The 16-bit paths (two pixels per 32-bit load over four counter lanes for
// large regions, a tracked bin range for small ones) must give exactly what
// the general integer path gives for the same values in an Int32Array; that
// path is checked against numpy in region-statistics.test.ts.

const COLUMNS = 701;
const ROWS = 500;

/** A 16-bit image placed `byteOffset` bytes into a larger buffer. */
function imageAt(byteOffset: number, seed: number): Uint16Array {
  const random = createSeededRandom(seed);
  const pixels = new Uint16Array(
    new ArrayBuffer(COLUMNS * ROWS * 2 + 16),
    byteOffset,
    COLUMNS * ROWS,
  );
  for (let i = 0; i < pixels.length; i += 1) {
    const x = i % COLUMNS;
    pixels[i] = Math.round(20000 + 9 * x + 800 * random.normal());
  }
  pixels[7] = 0;
  pixels[8] = 65535;
  return pixels;
}

const regions: Region[] = [
  { shape: 'rect', x0: 0, y0: 0, w: COLUMNS, h: ROWS },
  { shape: 'rect', x0: 1, y0: 3, w: 600, h: 480 },
  { shape: 'rect', x0: 2, y0: 0, w: 699, h: 450 },
  { shape: 'ring', cx: 351, cy: 249, rInner: 40, rOuter: 400 },
  { shape: 'circle', cx: 350.5, cy: 250, r: 31 },
  { shape: 'circle', cx: 0, cy: 0, r: 12.5 },
  { shape: 'rect', x0: 3, y0: 9, w: 1, h: 1 },
];

describe('regionStatistics 16-bit fast paths', () => {
  for (const byteOffset of [0, 2, 4, 6]) {
    it(`equals the general integer path for an image ${byteOffset} bytes into its buffer`, () => {
      const pixels = imageAt(byteOffset, 11 + byteOffset);
      const general = Int32Array.from(pixels);
      for (const region of regions) {
        const options = { percentiles: [0.5, 25, 99.5] };
        expect(
          regionStatistics(pixels, COLUMNS, ROWS, region, options),
        ).toEqual(regionStatistics(general, COLUMNS, ROWS, region, options));
      }
    });
  }

  it('equals the general path for signed 16-bit data and a linearisation table', () => {
    const random = createSeededRandom(3);
    const signed = Int16Array.from({ length: COLUMNS * ROWS }, () =>
      Math.round(-1500 + 700 * random.normal()),
    );
    const table = Float64Array.from(
      { length: 65536 },
      (_, k) => Math.sqrt(k) * 3.5,
    );
    const lut = { table, offset: 32768 };
    for (const region of regions) {
      expect(regionStatistics(signed, COLUMNS, ROWS, region, { lut })).toEqual(
        regionStatistics(Int32Array.from(signed), COLUMNS, ROWS, region, {
          lut,
        }),
      );
    }
  });
});
