import { createHash } from 'node:crypto';
import sharp from 'sharp';
import { describe, expect, it } from 'vitest';
import type { DecodedImage } from '../../../server/dicom/decode-dicom.ts';
import { renderPreview } from '../../../server/dicom/render-preview.ts';
import type { PixelArray } from '../../../shared/roi/region-statistics.ts';
import { createSeededRandom } from '../../../server/synthetic/seeded-random.ts';

// 8- and 16-bit images take a path that counts the box means while it
// averages (two pixels per load for unsigned 16-bit rows that start on a
// 4-byte boundary) and takes the automatic window from those counts; 32-bit
// images take the general one (box means, then regionStatistics
// percentiles). Both must give the same grey levels for the same values.

function image(
  pixels: PixelArray,
  columns: number,
  rows: number,
  photometricInterpretation = 'MONOCHROME2',
): DecodedImage {
  return {
    pixels,
    columns,
    rows,
    photometricInterpretation,
    header: {},
  } as unknown as DecodedImage;
}

/** Digest of the decoded grey levels (a deep equal of 10⁶ bytes is slow). */
/** 16-bit values 2 bytes into a larger buffer, so rows start mid-word. */
function unaligned(values: number[]): Uint16Array {
  const pixels = new Uint16Array(
    new ArrayBuffer(values.length * 2 + 4),
    2,
    values.length,
  );
  pixels.set(values);
  return pixels;
}

async function grey(png: Buffer): Promise<string> {
  const { data, info } = await sharp(png)
    .raw()
    .toBuffer({ resolveWithObject: true });
  const digest = createHash('sha256').update(data).digest('hex');
  return `${info.width}x${info.height}x${info.channels} ${digest}`;
}

describe('renderPreview counted path', () => {
  const cases: Array<[string, string, number, number, number[]]> = [
    // name, type, columns, rows, maxSizePx values (factors 1, 2, 3, 4, 5, more)
    [
      'odd-width uint16',
      'uint16',
      1201,
      797,
      [2000, 700, 401, 300, 250, 64, 1],
    ],
    // Even widths take the word loops; 2998 / 3 leaves an odd block count.
    ['even-width uint16', 'uint16', 2998, 1202, [1500, 1024, 750, 600]],
    ['mid-word uint16', 'unaligned', 2998, 1202, [1500, 1024, 750]],
    ['int16', 'int16', 640, 482, [700, 320, 214, 161, 128, 9]],
    ['uint8', 'uint8', 333, 250, [400, 167, 111, 84, 67]],
    ['int8', 'int8', 301, 299, [301, 151, 100, 76]],
  ];
  for (const [name, type, columns, rows, sizes] of cases) {
    it(`gives the general path's grey levels for ${name} data`, async () => {
      const random = createSeededRandom(columns);
      const values = Array.from({ length: columns * rows }, (_, i) => {
        const ramp = (i % columns) / columns + Math.floor(i / columns) / rows;
        return random.normal() * 0.1 + ramp / 2;
      });
      const scaled = (lo: number, hi: number) =>
        values.map((v) =>
          Math.max(lo, Math.min(hi, Math.round(lo + (hi - lo) * v))),
        );
      const pixels =
        type === 'uint16'
          ? Uint16Array.from(scaled(0, 65535))
          : type === 'unaligned'
            ? unaligned(scaled(0, 65535))
            : type === 'int16'
              ? Int16Array.from(scaled(-32768, 32767))
              : type === 'uint8'
                ? Uint8Array.from(scaled(0, 255))
                : Int8Array.from(scaled(-128, 127));
      const general = Int32Array.from(pixels);
      for (const photometric of ['MONOCHROME2', 'MONOCHROME1']) {
        for (const maxSizePx of sizes) {
          for (const window of [undefined, { center: 10.5, width: 300 }]) {
            const options = { maxSizePx, window };
            expect(
              await grey(
                await renderPreview(
                  image(pixels, columns, rows, photometric),
                  options,
                ),
              ),
            ).toEqual(
              await grey(
                await renderPreview(
                  image(general, columns, rows, photometric),
                  options,
                ),
              ),
            );
          }
        }
      }
    });
  }
});
