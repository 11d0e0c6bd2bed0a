import sharp from 'sharp';
import type { PixelArray } from '../../shared/roi/region-statistics.ts';
import { regionStatistics } from '../../shared/roi/region-statistics.ts';
import type { DecodedImage } from './decode-dicom.ts';

/** A display window in modality values (DICOM Window Center / Width). */
export interface DisplayWindow {
  center: number;
  width: number;
}

/** Options of {@link renderPreview}. */
export interface PreviewOptions {
  /** Longest side of the preview, in pixels; the image is never enlarged. */
  maxSizePx: number;
  /** Window to apply; by default the file's VOI window, else automatic. */
  window?: DisplayWindow;
}

/** Percentiles that bound the automatic window. */
export const AUTO_WINDOW_PERCENTILES = [0.5, 99.5] as const;

function firstNumber(value: unknown): number | null {
  const first = Array.isArray(value) ? value[0] : value;
  return typeof first === 'number' && Number.isFinite(first) ? first : null;
}

/**
 * Box-averages the image by a whole factor so its longest side fits
 * maxSizePx (edge blocks average the pixels they have). Integer data gives
 * rounded integer means, float data float means.
 */
function boxAverage(
  image: DecodedImage,
  factor: number,
): { values: Int32Array | Float64Array; width: number; height: number } {
  const { pixels, columns, rows } = image;
  const width = Math.ceil(columns / factor);
  const height = Math.ceil(rows / factor);
  const isFloat =
    pixels instanceof Float32Array || pixels instanceof Float64Array;
  const values = isFloat
    ? new Float64Array(width * height)
    : new Int32Array(width * height);
  // Column sums over the block's rows first (a sequential pass with no
  // dependency between neighbours), then each block sums its columns.
  const columnSums = new Float64Array(columns);
  for (let oy = 0; oy < height; oy += 1) {
    columnSums.fill(0);
    const yEnd = Math.min(rows, (oy + 1) * factor);
    for (let y = oy * factor; y < yEnd; y += 1) {
      addRow(pixels, y * columns, columns, columnSums);
    }
    const blockRows = yEnd - oy * factor;
    for (let ox = 0; ox < width; ox += 1) {
      const xEnd = Math.min(columns, (ox + 1) * factor);
      let sum = 0;
      for (let x = ox * factor; x < xEnd; x += 1) sum += columnSums[x]!;
      const mean = sum / (blockRows * (xEnd - ox * factor));
      values[oy * width + ox] = isFloat ? mean : Math.round(mean);
    }
  }
  return { values, width, height };
}

function addRow(
  pixels: PixelArray,
  start: number,
  columns: number,
  columnSums: Float64Array,
): void {
  for (let x = 0; x < columns; x += 1) columnSums[x]! += pixels[start + x]!;
}

/**
 * The window a preview uses: the one asked for, else the file's first VOI
 * window (Window Center/Width), else automatic from the 0.5th and 99.5th
 * percentiles of the (box-averaged) preview values.
 */
export function chooseWindow(
  image: DecodedImage,
  values: Int32Array | Float64Array,
  width: number,
  height: number,
  requested?: DisplayWindow,
): DisplayWindow & { source: 'request' | 'voi' | 'percentiles' } {
  if (requested) return { ...requested, source: 'request' };
  const center = firstNumber(image.header.WindowCenter);
  const voiWidth = firstNumber(image.header.WindowWidth);
  if (center !== null && voiWidth !== null && voiWidth >= 1) {
    return { center, width: voiWidth, source: 'voi' };
  }
  const { stats } = regionStatistics(
    values,
    width,
    height,
    { shape: 'rect', x0: 0, y0: 0, w: width, h: height },
    { percentiles: [...AUTO_WINDOW_PERCENTILES] },
  );
  const low = stats.percentiles[String(AUTO_WINDOW_PERCENTILES[0])]!;
  const high = stats.percentiles[String(AUTO_WINDOW_PERCENTILES[1])]!;
  // Inverse of the linear VOI function's ends: low → 0, high → 255.
  return { center: (low + high) / 2 + 0.5, width: Math.max(1, high - low + 1), source: 'percentiles' };
}

/**
 * Renders an 8-bit greyscale PNG preview with sharp: box-averaged to fit
 * maxSizePx, windowed by DICOM's linear VOI function (PS3.3 C.11.2.1.2.1),
 * shown inverted for MONOCHROME1.
 *
 * @returns the PNG bytes.
 * @throws RangeError for a maxSizePx below 1 or a window width below 1.
 * @see chooseWindow for the window used.
 */
export async function renderPreview(
  image: DecodedImage,
  options: PreviewOptions,
): Promise<Buffer> {
  const { maxSizePx } = options;
  if (!(Number.isInteger(maxSizePx) && maxSizePx >= 1)) {
    throw new RangeError(`maxSizePx must be a whole number ≥ 1, got ${maxSizePx}.`);
  }
  if (options.window && !(options.window.width >= 1)) {
    throw new RangeError(`Window width must be at least 1, got ${options.window.width}.`);
  }
  const factor = Math.max(1, Math.ceil(Math.max(image.columns, image.rows) / maxSizePx));
  const { values, width, height } = boxAverage(image, factor);
  const window = chooseWindow(image, values, width, height, options.window);
  const lowEdge = window.center - 0.5 - (window.width - 1) / 2;
  const highEdge = window.center - 0.5 + (window.width - 1) / 2;
  const scale = window.width > 1 ? 255 / (window.width - 1) : 0;
  const invert = image.photometricInterpretation === 'MONOCHROME1';
  const grey = new Uint8Array(width * height);
  for (let i = 0; i < grey.length; i += 1) {
    const x = values[i]!;
    const level =
      x <= lowEdge ? 0 : x > highEdge ? 255 : Math.round((x - lowEdge) * scale);
    grey[i] = invert ? 255 - level : level;
  }
  // Without toColourspace('b-w') sharp writes a one-channel raw image as RGB.
  return sharp(grey, { raw: { width, height, channels: 1 } })
    .toColourspace('b-w')
    .png({ compressionLevel: 3 })
    .toBuffer();
}
