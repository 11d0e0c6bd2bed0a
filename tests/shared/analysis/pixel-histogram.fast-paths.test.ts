import { describe, expect, it } from 'vitest';
import { pixelHistogram } from '../../../shared/analysis/pixel-histogram.ts';
import type { Region } from '../../../shared/roi/region-geometry.ts';
import { regionSpans } from '../../../shared/roi/region-mask.ts';
import { createSeededRandom } from '../../../server/synthetic/seeded-random.ts';

// The 16-bit path (bins by a shift, two pixels per 32-bit load, eight
// counter lanes) must count exactly as the general path does for the same
// values in a Float64Array; pixel-histogram.test.ts checks it against numpy.

const COLUMNS = 901;
const ROWS = 640;

describe('pixelHistogram 16-bit fast path', () => {
  const regions: Region[] = [
    { shape: 'rect', x0: 0, y0: 0, w: COLUMNS, h: ROWS },
    { shape: 'rect', x0: 1, y0: 2, w: 800, h: 600 },
    { shape: 'ring', cx: 450, cy: 320, rInner: 50, rOuter: 500 },
    { shape: 'circle', cx: 100.5, cy: 90, r: 40 },
  ];
  for (const byteOffset of [0, 2, 6]) {
    it(`counts as the general path for an image ${byteOffset} bytes into its buffer`, () => {
      const random = createSeededRandom(29 + byteOffset);
      const pixels = new Uint16Array(
        new ArrayBuffer(COLUMNS * ROWS * 2 + 16),
        byteOffset,
        COLUMNS * ROWS,
      );
      for (let i = 0; i < pixels.length; i += 1) {
        pixels[i] = Math.min(
          65535,
          Math.max(0, Math.round(30000 + 12000 * random.normal())),
        );
      }
      const general = Float64Array.from(pixels);
      for (const region of regions) {
        const spans = regionSpans(region, COLUMNS, ROWS);
        for (const bins of [65536, 4096, 256, 1]) {
          const options = { bins, rangeMin: 0, rangeMax: 65536 };
          expect(pixelHistogram(pixels, COLUMNS, spans, options)).toEqual(
            pixelHistogram(general, COLUMNS, spans, options),
          );
        }
      }
    });
  }
});
