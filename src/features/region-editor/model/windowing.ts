import type { PixelArray } from '../../../../shared/roi/region-statistics.ts';

/** A full-resolution image as the pixels route sends it. */
export interface PixelImage {
  pixels: PixelArray;
  columns: number;
  rows: number;
}

/** Display window: values centre ± width/2 span black to white. */
export interface DisplayWindow {
  center: number;
  width: number;
}

/**
 * A window from the 0.5th to the 99.5th percentile of a subsample, so a few
 * extreme pixels (collimator edges, lead) do not wash the image out.
 */
export function defaultWindow(image: PixelImage): DisplayWindow {
  const step = Math.max(1, Math.floor(image.pixels.length / 100_000));
  const sample: number[] = [];
  for (let i = 0; i < image.pixels.length; i += step) {
    const v = image.pixels[i]!;
    if (Number.isFinite(v)) sample.push(v);
  }
  if (sample.length === 0) return { center: 0, width: 1 };
  sample.sort((a, b) => a - b);
  const low = sample[Math.floor(0.005 * (sample.length - 1))]!;
  const high = sample[Math.ceil(0.995 * (sample.length - 1))]!;
  return { center: (low + high) / 2, width: Math.max(1, high - low) };
}

/**
 * Grey levels of the image under a window, written as RGBA into `out`
 * (length columns × rows × 4); integer data goes through a lookup table
 * over its range, so a window change costs one pass.
 */
export function renderWindowed(
  image: PixelImage,
  window: DisplayWindow,
  out: Uint8ClampedArray,
): void {
  const { pixels } = image;
  const low = window.center - window.width / 2;
  const scale = 255 / window.width;
  const grey = (v: number) => (v - low) * scale;
  const integer =
    pixels instanceof Uint8Array ||
    pixels instanceof Int8Array ||
    pixels instanceof Uint16Array ||
    pixels instanceof Int16Array;
  if (integer) {
    const offset =
      pixels instanceof Int16Array
        ? 32768
        : pixels instanceof Int8Array
          ? 128
          : 0;
    const size =
      pixels instanceof Uint8Array || pixels instanceof Int8Array ? 256 : 65536;
    const table = new Uint8ClampedArray(size);
    for (let k = 0; k < size; k += 1) table[k] = grey(k - offset);
    for (let i = 0, j = 0; i < pixels.length; i += 1, j += 4) {
      const g = table[pixels[i]! + offset]!;
      out[j] = g;
      out[j + 1] = g;
      out[j + 2] = g;
      out[j + 3] = 255;
    }
    return;
  }
  for (let i = 0, j = 0; i < pixels.length; i += 1, j += 4) {
    const g = grey(pixels[i]!);
    out[j] = g;
    out[j + 1] = g;
    out[j + 2] = g;
    out[j + 3] = 255;
  }
}
