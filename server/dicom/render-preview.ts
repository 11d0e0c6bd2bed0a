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
  const fullWidth = Math.floor(columns / factor);
  const fullHeight = Math.floor(rows / factor);
  // Whole blocks of the usual factors in unrolled loops: a preview of a
  // 3000-px image is three times faster this way than with nested loops.
  if (factor === 2)
    average2(pixels, columns, fullWidth, fullHeight, width, values);
  else if (factor === 3)
    average3(pixels, columns, fullWidth, fullHeight, width, values);
  else
    averageBlocks(
      pixels,
      columns,
      rows,
      factor,
      0,
      fullWidth,
      0,
      fullHeight,
      width,
      values,
    );
  // The partial blocks along the right and bottom edges.
  averageBlocks(
    pixels,
    columns,
    rows,
    factor,
    fullWidth,
    width,
    0,
    height,
    width,
    values,
  );
  averageBlocks(
    pixels,
    columns,
    rows,
    factor,
    0,
    fullWidth,
    fullHeight,
    height,
    width,
    values,
  );
  return { values, width, height };
}

function average2(
  px: PixelArray,
  columns: number,
  fullWidth: number,
  fullHeight: number,
  width: number,
  out: Int32Array | Float64Array,
): void {
  const rounding = out instanceof Int32Array;
  for (let oy = 0; oy < fullHeight; oy += 1) {
    const r0 = 2 * oy * columns;
    const r1 = r0 + columns;
    for (
      let ox = 0, x = 0, o = oy * width;
      ox < fullWidth;
      ox += 1, x += 2, o += 1
    ) {
      const sum = px[r0 + x]! + px[r0 + x + 1]! + px[r1 + x]! + px[r1 + x + 1]!;
      out[o] = rounding ? Math.round(sum / 4) : sum / 4;
    }
  }
}

function average3(
  px: PixelArray,
  columns: number,
  fullWidth: number,
  fullHeight: number,
  width: number,
  out: Int32Array | Float64Array,
): void {
  const rounding = out instanceof Int32Array;
  for (let oy = 0; oy < fullHeight; oy += 1) {
    const r0 = 3 * oy * columns;
    const r1 = r0 + columns;
    const r2 = r1 + columns;
    for (
      let ox = 0, x = 0, o = oy * width;
      ox < fullWidth;
      ox += 1, x += 3, o += 1
    ) {
      const sum =
        px[r0 + x]! +
        px[r0 + x + 1]! +
        px[r0 + x + 2]! +
        px[r1 + x]! +
        px[r1 + x + 1]! +
        px[r1 + x + 2]! +
        px[r2 + x]! +
        px[r2 + x + 1]! +
        px[r2 + x + 2]!;
      out[o] = rounding ? Math.round(sum / 9) : sum / 9;
    }
  }
}

/** Means of the blocks [ox0, ox1) × [oy0, oy1), each clipped to the image. */
function averageBlocks(
  px: PixelArray,
  columns: number,
  rows: number,
  factor: number,
  ox0: number,
  ox1: number,
  oy0: number,
  oy1: number,
  width: number,
  out: Int32Array | Float64Array,
): void {
  const rounding = out instanceof Int32Array;
  for (let oy = oy0; oy < oy1; oy += 1) {
    const y0 = oy * factor;
    const y1 = Math.min(rows, y0 + factor);
    for (let ox = ox0; ox < ox1; ox += 1) {
      const x0 = ox * factor;
      const x1 = Math.min(columns, x0 + factor);
      let sum = 0;
      for (let y = y0; y < y1; y += 1) {
        const base = y * columns;
        for (let i = base + x0; i < base + x1; i += 1) sum += px[i]!;
      }
      const mean = sum / ((y1 - y0) * (x1 - x0));
      out[oy * width + ox] = rounding ? Math.round(mean) : mean;
    }
  }
}

/** Pixel arrays whose box means fit one 65536-slot count array. */
type SmallIntegerPixels = Uint8Array | Int8Array | Uint16Array | Int16Array;

function isSmallInteger(pixels: PixelArray): pixels is SmallIntegerPixels {
  return (
    pixels instanceof Uint16Array ||
    pixels instanceof Int16Array ||
    pixels instanceof Uint8Array ||
    pixels instanceof Int8Array
  );
}

/** Box means of 8- and 16-bit data, and how often each mean occurs. */
interface CountedMeans {
  values: Int32Array;
  width: number;
  height: number;
  /** counts[mean + countOffset] is the number of blocks with that mean. */
  counts: Uint32Array;
  countOffset: number;
  min: number;
  max: number;
}

// The counted means round as boxAverage does, Math.round(sum / n), written
// as ⌊(2·sum + n) / (2n)⌋: equal for integer sums this small (far below 2⁵³),
// and Math.floor is several times faster than Math.round in V8's optimised
// code.

/** Factor 1: the values themselves, counted. */
function countedAverage1(
  px: SmallIntegerPixels,
  columns: number,
  fullWidth: number,
  fullHeight: number,
  width: number,
  out: Int32Array,
  counts: Uint32Array,
  countOffset: number,
): void {
  for (let y = 0; y < fullHeight; y += 1) {
    for (let x = 0, i = y * columns, o = y * width; x < fullWidth; x += 1) {
      const value = px[i + x]!;
      out[o + x] = value;
      counts[value + countOffset]! += 1;
    }
  }
}

/** Whole 2 × 2 blocks, unrolled. */
function countedAverage2(
  px: SmallIntegerPixels,
  columns: number,
  fullWidth: number,
  fullHeight: number,
  width: number,
  out: Int32Array,
  counts: Uint32Array,
  countOffset: number,
): void {
  for (let oy = 0; oy < fullHeight; oy += 1) {
    const r0 = 2 * oy * columns;
    const r1 = r0 + columns;
    for (
      let ox = 0, x = 0, o = oy * width;
      ox < fullWidth;
      ox += 1, x += 2, o += 1
    ) {
      const sum = px[r0 + x]! + px[r0 + x + 1]! + px[r1 + x]! + px[r1 + x + 1]!;
      const mean = Math.floor((2 * sum + 4) / 8);
      out[o] = mean;
      counts[mean + countOffset]! += 1;
    }
  }
}

/** Whole 3 × 3 blocks, unrolled. */
function countedAverage3(
  px: SmallIntegerPixels,
  columns: number,
  fullWidth: number,
  fullHeight: number,
  width: number,
  out: Int32Array,
  counts: Uint32Array,
  countOffset: number,
): void {
  for (let oy = 0; oy < fullHeight; oy += 1) {
    const r0 = 3 * oy * columns;
    const r1 = r0 + columns;
    const r2 = r1 + columns;
    for (
      let ox = 0, x = 0, o = oy * width;
      ox < fullWidth;
      ox += 1, x += 3, o += 1
    ) {
      const sum =
        px[r0 + x]! +
        px[r0 + x + 1]! +
        px[r0 + x + 2]! +
        px[r1 + x]! +
        px[r1 + x + 1]! +
        px[r1 + x + 2]! +
        px[r2 + x]! +
        px[r2 + x + 1]! +
        px[r2 + x + 2]!;
      const mean = Math.floor((2 * sum + 9) / 18);
      out[o] = mean;
      counts[mean + countOffset]! += 1;
    }
  }
}

/** Whole 4 × 4 blocks, unrolled. */
function countedAverage4(
  px: SmallIntegerPixels,
  columns: number,
  fullWidth: number,
  fullHeight: number,
  width: number,
  out: Int32Array,
  counts: Uint32Array,
  countOffset: number,
): void {
  for (let oy = 0; oy < fullHeight; oy += 1) {
    const r0 = 4 * oy * columns;
    const r1 = r0 + columns;
    const r2 = r1 + columns;
    const r3 = r2 + columns;
    for (
      let ox = 0, x = 0, o = oy * width;
      ox < fullWidth;
      ox += 1, x += 4, o += 1
    ) {
      const sum =
        px[r0 + x]! +
        px[r0 + x + 1]! +
        px[r0 + x + 2]! +
        px[r0 + x + 3]! +
        px[r1 + x]! +
        px[r1 + x + 1]! +
        px[r1 + x + 2]! +
        px[r1 + x + 3]! +
        px[r2 + x]! +
        px[r2 + x + 1]! +
        px[r2 + x + 2]! +
        px[r2 + x + 3]! +
        px[r3 + x]! +
        px[r3 + x + 1]! +
        px[r3 + x + 2]! +
        px[r3 + x + 3]!;
      const mean = Math.floor((2 * sum + 16) / 32);
      out[o] = mean;
      counts[mean + countOffset]! += 1;
    }
  }
}

/** Whether a 32-bit load holds the lower-addressed 16-bit pixel in its low half. */
const LITTLE_ENDIAN = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1;

/**
 * The unsigned 16-bit image as 32-bit words, two pixels each, when every
 * row starts on a word (even width, 4-byte aligned start); else null.
 */
function pixelWords(pixels: Uint16Array, columns: number): Uint32Array | null {
  if (!LITTLE_ENDIAN || columns % 2 !== 0 || pixels.byteOffset % 4 !== 0) {
    return null;
  }
  return new Uint32Array(pixels.buffer, pixels.byteOffset, pixels.length >> 1);
}

// The word versions of the whole-block loops read two pixels per load,
// which takes about a third off the time of the averaging pass.

/** {@link countedAverage2} over words: one word per block row. */
function wordAverage2(
  words: Uint32Array,
  rowWords: number,
  fullWidth: number,
  fullHeight: number,
  width: number,
  out: Int32Array,
  counts: Uint32Array,
): void {
  for (let oy = 0; oy < fullHeight; oy += 1) {
    const r0 = 2 * oy * rowWords;
    const r1 = r0 + rowWords;
    for (let ox = 0, o = oy * width; ox < fullWidth; ox += 1, o += 1) {
      const a = words[r0 + ox]!;
      const b = words[r1 + ox]!;
      const sum = (a & 0xffff) + (a >>> 16) + (b & 0xffff) + (b >>> 16);
      const mean = Math.floor((2 * sum + 4) / 8);
      out[o] = mean;
      counts[mean]! += 1;
    }
  }
}

/**
 * {@link countedAverage3} over words: two blocks (six pixels) are three
 * words per block row; an odd last block is read pixel by pixel.
 */
function wordAverage3(
  words: Uint32Array,
  pixels: Uint16Array,
  columns: number,
  fullWidth: number,
  fullHeight: number,
  width: number,
  out: Int32Array,
  counts: Uint32Array,
): void {
  const rowWords = columns >> 1;
  const pairs = fullWidth >> 1;
  for (let oy = 0; oy < fullHeight; oy += 1) {
    const r0 = 3 * oy * rowWords;
    const r1 = r0 + rowWords;
    const r2 = r1 + rowWords;
    let o = oy * width;
    for (let j = 0, w = 0; j < pairs; j += 1, w += 3, o += 2) {
      const a0 = words[r0 + w]!;
      const a1 = words[r0 + w + 1]!;
      const a2 = words[r0 + w + 2]!;
      const b0 = words[r1 + w]!;
      const b1 = words[r1 + w + 1]!;
      const b2 = words[r1 + w + 2]!;
      const c0 = words[r2 + w]!;
      const c1 = words[r2 + w + 1]!;
      const c2 = words[r2 + w + 2]!;
      const left =
        (a0 & 0xffff) +
        (a0 >>> 16) +
        (a1 & 0xffff) +
        (b0 & 0xffff) +
        (b0 >>> 16) +
        (b1 & 0xffff) +
        (c0 & 0xffff) +
        (c0 >>> 16) +
        (c1 & 0xffff);
      const right =
        (a1 >>> 16) +
        (a2 & 0xffff) +
        (a2 >>> 16) +
        (b1 >>> 16) +
        (b2 & 0xffff) +
        (b2 >>> 16) +
        (c1 >>> 16) +
        (c2 & 0xffff) +
        (c2 >>> 16);
      const meanLeft = Math.floor((2 * left + 9) / 18);
      const meanRight = Math.floor((2 * right + 9) / 18);
      out[o] = meanLeft;
      out[o + 1] = meanRight;
      counts[meanLeft]! += 1;
      counts[meanRight]! += 1;
    }
  }
  if (fullWidth % 2 === 1) {
    countedAverageBlocks(
      pixels,
      columns,
      3 * fullHeight,
      3,
      fullWidth - 1,
      fullWidth,
      0,
      fullHeight,
      width,
      out,
      counts,
      0,
    );
  }
}

/** {@link countedAverage4} over words: two words per block row. */
function wordAverage4(
  words: Uint32Array,
  rowWords: number,
  fullWidth: number,
  fullHeight: number,
  width: number,
  out: Int32Array,
  counts: Uint32Array,
): void {
  for (let oy = 0; oy < fullHeight; oy += 1) {
    const r0 = 4 * oy * rowWords;
    const r1 = r0 + rowWords;
    const r2 = r1 + rowWords;
    const r3 = r2 + rowWords;
    for (
      let ox = 0, w = 0, o = oy * width;
      ox < fullWidth;
      ox += 1, w += 2, o += 1
    ) {
      const a0 = words[r0 + w]!;
      const a1 = words[r0 + w + 1]!;
      const b0 = words[r1 + w]!;
      const b1 = words[r1 + w + 1]!;
      const c0 = words[r2 + w]!;
      const c1 = words[r2 + w + 1]!;
      const d0 = words[r3 + w]!;
      const d1 = words[r3 + w + 1]!;
      const sum =
        (a0 & 0xffff) +
        (a0 >>> 16) +
        (a1 & 0xffff) +
        (a1 >>> 16) +
        (b0 & 0xffff) +
        (b0 >>> 16) +
        (b1 & 0xffff) +
        (b1 >>> 16) +
        (c0 & 0xffff) +
        (c0 >>> 16) +
        (c1 & 0xffff) +
        (c1 >>> 16) +
        (d0 & 0xffff) +
        (d0 >>> 16) +
        (d1 & 0xffff) +
        (d1 >>> 16);
      const mean = Math.floor((2 * sum + 16) / 32);
      out[o] = mean;
      counts[mean]! += 1;
    }
  }
}

/** Counted means of the blocks [ox0, ox1) × [oy0, oy1), each clipped to the image. */
function countedAverageBlocks(
  px: SmallIntegerPixels,
  columns: number,
  rows: number,
  factor: number,
  ox0: number,
  ox1: number,
  oy0: number,
  oy1: number,
  width: number,
  out: Int32Array,
  counts: Uint32Array,
  countOffset: number,
): void {
  for (let oy = oy0; oy < oy1; oy += 1) {
    const y0 = oy * factor;
    const y1 = Math.min(rows, y0 + factor);
    for (let ox = ox0; ox < ox1; ox += 1) {
      const x0 = ox * factor;
      const x1 = Math.min(columns, x0 + factor);
      let sum = 0;
      for (let y = y0; y < y1; y += 1) {
        const base = y * columns;
        for (let i = base + x0; i < base + x1; i += 1) sum += px[i]!;
      }
      const area = (y1 - y0) * (x1 - x0);
      const mean = Math.floor((2 * sum + area) / (2 * area));
      out[oy * width + ox] = mean;
      counts[mean + countOffset]! += 1;
    }
  }
}

/** Counted means of the whole blocks, by the fastest loop that fits. */
function countWholeBlocks(
  pixels: SmallIntegerPixels,
  columns: number,
  rows: number,
  factor: number,
  fullWidth: number,
  fullHeight: number,
  width: number,
  out: Int32Array,
  counts: Uint32Array,
  countOffset: number,
): void {
  const words =
    pixels instanceof Uint16Array && factor >= 2 && factor <= 4
      ? pixelWords(pixels, columns)
      : null;
  if (words && factor === 2) {
    wordAverage2(
      words,
      columns >> 1,
      fullWidth,
      fullHeight,
      width,
      out,
      counts,
    );
  } else if (words && factor === 3) {
    const unsigned = pixels as Uint16Array;
    wordAverage3(
      words,
      unsigned,
      columns,
      fullWidth,
      fullHeight,
      width,
      out,
      counts,
    );
  } else if (words) {
    wordAverage4(
      words,
      columns >> 1,
      fullWidth,
      fullHeight,
      width,
      out,
      counts,
    );
  } else if (factor <= 4) {
    const unrolled = [
      countedAverage1,
      countedAverage2,
      countedAverage3,
      countedAverage4,
    ][factor - 1]!;
    unrolled(
      pixels,
      columns,
      fullWidth,
      fullHeight,
      width,
      out,
      counts,
      countOffset,
    );
  } else {
    countedAverageBlocks(
      pixels,
      columns,
      rows,
      factor,
      0,
      fullWidth,
      0,
      fullHeight,
      width,
      out,
      counts,
      countOffset,
    );
  }
}

/**
 * {@link boxAverage} for 8- and 16-bit data, counting each mean as it is
 * written: one pass over the image gives both the preview values and the
 * histogram its automatic window needs.
 */
function countedBoxAverage(
  pixels: SmallIntegerPixels,
  columns: number,
  rows: number,
  factor: number,
): CountedMeans {
  const width = Math.ceil(columns / factor);
  const height = Math.ceil(rows / factor);
  const values = new Int32Array(width * height);
  const counts = new Uint32Array(65536);
  const countOffset =
    pixels instanceof Int16Array
      ? 32768
      : pixels instanceof Int8Array
        ? 128
        : 0;
  const fullWidth = Math.floor(columns / factor);
  const fullHeight = Math.floor(rows / factor);
  countWholeBlocks(
    pixels,
    columns,
    rows,
    factor,
    fullWidth,
    fullHeight,
    width,
    values,
    counts,
    countOffset,
  );
  // The partial blocks along the right and bottom edges.
  countedAverageBlocks(
    pixels,
    columns,
    rows,
    factor,
    fullWidth,
    width,
    0,
    height,
    width,
    values,
    counts,
    countOffset,
  );
  countedAverageBlocks(
    pixels,
    columns,
    rows,
    factor,
    0,
    fullWidth,
    fullHeight,
    height,
    width,
    values,
    counts,
    countOffset,
  );
  let low = 0;
  while (counts[low] === 0) low += 1;
  let high = counts.length - 1;
  while (counts[high] === 0) high -= 1;
  return {
    values,
    width,
    height,
    counts,
    countOffset,
    min: low - countOffset,
    max: high - countOffset,
  };
}

/**
 * The p-th percentile of counted integer values, by the definition of
 * {@link RegionStatistics.percentiles}, evaluated with the same arithmetic as
 * regionStatistics so both give the same number.
 */
function percentileOfCounts(means: CountedMeans, n: number, p: number): number {
  const { counts, countOffset } = means;
  const h = (p / 100) * (n - 1);
  const lower = Math.floor(h);
  const fraction = h - lower;
  // The value at a 0-based rank: the first whose running count exceeds it.
  const at = (rank: number): number => {
    let running = 0;
    for (let b = means.min + countOffset; ; b += 1) {
      running += counts[b]!;
      if (running > rank) return b - countOffset;
    }
  };
  const a = at(lower);
  if (fraction === 0) return a;
  const b = at(Math.min(lower + 1, n - 1));
  return a + fraction * (b - a);
}

/** The window whose linear VOI function maps low to 0 and high to 255. */
function windowBetween(
  low: number,
  high: number,
): DisplayWindow & { source: 'percentiles' } {
  return {
    center: (low + high) / 2 + 0.5,
    width: Math.max(1, high - low + 1),
    source: 'percentiles',
  };
}

/** The requested window, else the file's VOI window, else `automatic()`. */
function pickWindow(
  image: DecodedImage,
  requested: DisplayWindow | undefined,
  automatic: () => DisplayWindow & { source: 'percentiles' },
): DisplayWindow & { source: 'request' | 'voi' | 'percentiles' } {
  if (requested) return { ...requested, source: 'request' };
  const center = firstNumber(image.header.WindowCenter);
  const voiWidth = firstNumber(image.header.WindowWidth);
  if (center !== null && voiWidth !== null && voiWidth >= 1) {
    return { center, width: voiWidth, source: 'voi' };
  }
  return automatic();
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
  return pickWindow(image, requested, () => {
    const { stats } = regionStatistics(
      values,
      width,
      height,
      { shape: 'rect', x0: 0, y0: 0, w: width, h: height },
      { percentiles: [...AUTO_WINDOW_PERCENTILES] },
    );
    return windowBetween(
      stats.percentiles[String(AUTO_WINDOW_PERCENTILES[0])]!,
      stats.percentiles[String(AUTO_WINDOW_PERCENTILES[1])]!,
    );
  });
}

/** Smallest and largest value of a non-empty array. */
function int32Range(values: Int32Array): { min: number; max: number } {
  let min = values[0]!;
  let max = min;
  for (let i = 1; i < values.length; i += 1) {
    const v = values[i]!;
    if (v < min) min = v;
    if (v > max) max = v;
  }
  return { min, max };
}

/**
 * Maps values through DICOM's linear VOI function to 0–255 (inverted for
 * MONOCHROME1). Integer values go through a table built once over their
 * range (`range` when the caller knows it), which avoids rounding every pixel.
 */
function toGrey(
  values: Int32Array | Float64Array,
  window: DisplayWindow,
  invert: boolean,
  range?: { min: number; max: number },
): Uint8Array {
  const lowEdge = window.center - 0.5 - (window.width - 1) / 2;
  const highEdge = window.center - 0.5 + (window.width - 1) / 2;
  const scale = window.width > 1 ? 255 / (window.width - 1) : 0;
  const level = (x: number): number => {
    const y =
      x <= lowEdge ? 0 : x > highEdge ? 255 : Math.round((x - lowEdge) * scale);
    return invert ? 255 - y : y;
  };
  const grey = new Uint8Array(values.length);
  if (values instanceof Int32Array) {
    const { min, max } = range ?? int32Range(values);
    if (max - min < 1 << 20) {
      const table = new Uint8Array(max - min + 1);
      for (let v = min; v <= max; v += 1) table[v - min] = level(v);
      for (let i = 0; i < values.length; i += 1)
        grey[i] = table[values[i]! - min]!;
      return grey;
    }
  }
  for (let i = 0; i < values.length; i += 1) grey[i] = level(values[i]!);
  return grey;
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
    throw new RangeError(
      `maxSizePx must be a whole number ≥ 1, got ${maxSizePx}.`,
    );
  }
  if (options.window && !(options.window.width >= 1)) {
    throw new RangeError(
      `Window width must be at least 1, got ${options.window.width}.`,
    );
  }
  const factor = Math.max(
    1,
    Math.ceil(Math.max(image.columns, image.rows) / maxSizePx),
  );
  const invert = image.photometricInterpretation === 'MONOCHROME1';
  let grey: Uint8Array;
  let width: number;
  let height: number;
  if (isSmallInteger(image.pixels)) {
    // The automatic window's percentiles come from the counts gathered while
    // averaging, not from a second pass over the averaged values.
    const means = countedBoxAverage(
      image.pixels,
      image.columns,
      image.rows,
      factor,
    );
    ({ width, height } = means);
    const n = means.values.length;
    const window = pickWindow(image, options.window, () =>
      windowBetween(
        percentileOfCounts(means, n, AUTO_WINDOW_PERCENTILES[0]),
        percentileOfCounts(means, n, AUTO_WINDOW_PERCENTILES[1]),
      ),
    );
    grey = toGrey(means.values, window, invert, means);
  } else {
    const averaged = boxAverage(image, factor);
    ({ width, height } = averaged);
    const window = chooseWindow(
      image,
      averaged.values,
      width,
      height,
      options.window,
    );
    grey = toGrey(averaged.values, window, invert);
  }
  // Without toColourspace('b-w') sharp writes a one-channel raw image as RGB.
  return sharp(grey, { raw: { width, height, channels: 1 } })
    .toColourspace('b-w')
    .png({ compressionLevel: 3 })
    .toBuffer();
}
