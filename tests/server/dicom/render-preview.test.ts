import sharp from 'sharp';
import { describe, expect, it } from 'vitest';
import { decodeDicom } from '../../../server/dicom/decode-dicom.ts';
import { renderPreview } from '../../../server/dicom/render-preview.ts';
import { writeDicom } from '../../../server/dicom/write-dicom.ts';

type Attributes = Record<string, string | number | number[] | string[]>;

/** 300 × 200 image: left half 1000, right half 3000. */
async function halves(attributes: Attributes = {}) {
  const pixels = new Uint16Array(300 * 200);
  for (let i = 0; i < pixels.length; i += 1)
    pixels[i] = i % 300 < 150 ? 1000 : 3000;
  return decodeDicom(
    writeDicom({ rows: 200, columns: 300, pixels, attributes }),
  );
}

async function greyOf(png: Buffer) {
  const { data, info } = await sharp(png)
    .raw()
    .toBuffer({ resolveWithObject: true });
  return {
    data,
    info,
    at: (x: number, y: number) => data[(y * info.width + x) * info.channels]!,
  };
}

describe('renderPreview', () => {
  it('writes an 8-bit one-channel PNG no larger than maxSizePx', async () => {
    const png = await renderPreview(await halves(), { maxSizePx: 64 });
    const meta = await sharp(png).metadata();

    // 300 / ceil(300/64) = 60, 200 / 5 = 40.
    expect(meta).toMatchObject({
      format: 'png',
      width: 60,
      height: 40,
      channels: 1,
      depth: 'uchar',
    });
  });

  it('uses the file’s VOI window (DICOM PS3.3 C.11.2.1.2 linear function)', async () => {
    // Center 2000.5, width 2001: values ≤ 1000 → 0, > 3000 → 255; 3000 maps to 255.
    const png = await renderPreview(
      await halves({ WindowCenter: 2000.5, WindowWidth: 2001 }),
      { maxSizePx: 300 },
    );
    const grey = await greyOf(png);

    expect([grey.at(10, 10), grey.at(290, 10)]).toEqual([0, 255]);
  });

  it('lets a requested window override the file’s', async () => {
    const image = await halves({ WindowCenter: 2000.5, WindowWidth: 2001 });
    // Window 0…2000: both halves at or above mid-grey, the right one white.
    const grey = await greyOf(
      await renderPreview(image, {
        maxSizePx: 300,
        window: { center: 1000.5, width: 2001 },
      }),
    );

    expect(grey.at(10, 10)).toBe(128);
    expect(grey.at(290, 10)).toBe(255);
  });

  it('windows automatically from the 0.5–99.5 % percentiles, and inverts MONOCHROME1', async () => {
    const ramp = Uint16Array.from(
      { length: 256 * 4 },
      (_, i) => 500 + (i % 256) * 10,
    );
    const plain = await decodeDicom(
      writeDicom({ rows: 4, columns: 256, pixels: ramp, attributes: {} }),
    );
    const inverted = await decodeDicom(
      writeDicom({
        rows: 4,
        columns: 256,
        pixels: ramp,
        attributes: { PhotometricInterpretation: 'MONOCHROME1' },
      }),
    );

    const a = await greyOf(await renderPreview(plain, { maxSizePx: 256 }));
    const b = await greyOf(await renderPreview(inverted, { maxSizePx: 256 }));

    expect([a.at(0, 0), a.at(255, 0)]).toEqual([0, 255]);
    expect(a.at(128, 0)).toBeGreaterThan(120);
    expect(a.at(128, 0)).toBeLessThan(136);
    expect([b.at(0, 0), b.at(255, 0)]).toEqual([255, 0]);
  });

  it.each([2, 3, 4])(
    'box-averages by %i, edge blocks included, then applies the window',
    async (factor) => {
      const columns = 100 * factor + 1;
      const rows = 50 * factor - 1;
      const pixels = Uint16Array.from(
        { length: columns * rows },
        (_, i) => (i * 7919) % 4096,
      );
      const image = await decodeDicom(
        writeDicom({ rows, columns, pixels, attributes: {} }),
      );
      const window = { center: 2048, width: 4096 };

      const grey = await greyOf(
        await renderPreview(image, { maxSizePx: 101, window }),
      );

      // Straight from the definitions: block mean, rounded, then PS3.3's linear VOI.
      const width = Math.ceil(columns / factor);
      const height = Math.ceil(rows / factor);
      expect([grey.info.width, grey.info.height]).toEqual([width, height]);
      const low = window.center - 0.5 - (window.width - 1) / 2;
      for (let oy = 0; oy < height; oy += 1) {
        for (let ox = 0; ox < width; ox += 1) {
          let sum = 0;
          let n = 0;
          for (
            let y = oy * factor;
            y < Math.min(rows, (oy + 1) * factor);
            y += 1
          ) {
            for (
              let x = ox * factor;
              x < Math.min(columns, (ox + 1) * factor);
              x += 1
            ) {
              sum += pixels[y * columns + x]!;
              n += 1;
            }
          }
          const mean = Math.round(sum / n);
          const expected = Math.min(
            255,
            Math.max(0, Math.round(((mean - low) * 255) / (window.width - 1))),
          );
          expect(grey.at(ox, oy)).toBe(expected);
        }
      }
    },
  );

  it('rejects a size below one pixel', async () => {
    await expect(
      renderPreview(await halves(), { maxSizePx: 0 }),
    ).rejects.toThrow(RangeError);
  });
});
