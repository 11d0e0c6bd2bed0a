import { DomainError } from '../errors.ts';
import type { Warning } from '../warnings.ts';
import type { Region } from './region-geometry.ts';
import type { RegionSpans } from './region-mask.ts';
import { regionSpans } from './region-mask.ts';

/** Pixel buffers the statistics accept (one sample per pixel, row-major). */
export type PixelArray =
  | Uint8Array
  | Int8Array
  | Uint16Array
  | Int16Array
  | Int32Array
  | Uint32Array
  | Float32Array
  | Float64Array;

/** Statistics of the pixel values inside a region, in the pixels' own units. */
export interface RegionStatistics {
  /** Number of pixels measured. */
  n: number;
  mean: number;
  /** Sample standard deviation (divisor n − 1); 0 for a single pixel, with a warning. */
  sampleSd: number;
  /** Population standard deviation (divisor n). */
  populationSd: number;
  min: number;
  max: number;
  /** 50th percentile, same definition as `percentiles`. */
  median: number;
  /**
   * Requested percentiles keyed by `String(p)` (e.g. "5", "99.5"), by
   * numpy's default definition ("linear", Hyndman & Fan type 7): with the n
   * values sorted as a[0..n−1] and h = (p/100)·(n−1),
   * value = a[⌊h⌋] + (h − ⌊h⌋)·(a[⌊h⌋+1] − a[⌊h⌋]).
   */
  percentiles: Record<string, number>;
}

/** A detector linearisation: the signal of stored value v is table[v + offset]. */
export interface SignalLookupTable {
  table: Float64Array;
  offset: number;
}

/** Options of {@link regionStatistics}. */
export interface RegionStatisticsOptions {
  /** Percentiles (0–100) to report beside the median; none by default. */
  percentiles?: number[];
  /** Applied to integer data before any statistic; refused for float data. */
  lut?: SignalLookupTable;
}

/** Regions from this many pixels on use four-lane 16-bit histograms. */
const LANE_THRESHOLD = 1 << 18;

/** Whether a 32-bit load holds the lower-addressed 16-bit pixel in its low half. */
const LITTLE_ENDIAN = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1;

/** Integer ranges up to this many values are histogrammed; wider ones sorted. */
const MAX_HISTOGRAM_BINS = 1 << 20;

// Reused between calls so a region editor does not allocate per request; the
// code is synchronous, so one buffer is never used by two calls at once.
let histogramScratch = new Uint32Array(65536);
let valueScratch = new Float64Array(0);
let laneScratch = new Uint32Array(0);

/** Neumaier's compensated sum, so a long run of additions stays exact-ish. */
class CompensatedSum {
  private sum = 0;
  private compensation = 0;

  add(value: number): void {
    const t = this.sum + value;
    if (Math.abs(this.sum) >= Math.abs(value)) {
      this.compensation += this.sum - t + value;
    } else {
      this.compensation += value - t + this.sum;
    }
    this.sum = t;
  }

  value(): number {
    return this.sum + this.compensation;
  }
}

function fail(message: string): never {
  throw new DomainError('validation_failed', message);
}

function checkPercentiles(percentiles: number[]): void {
  for (const p of percentiles) {
    if (!(Number.isFinite(p) && p >= 0 && p <= 100)) {
      fail(`Percentile ${p} is not between 0 and 100.`);
    }
  }
}

function histogramShape(
  pixels: PixelArray,
  columns: number,
  spans: RegionSpans,
): { offset: number; bins: number } | null {
  if (pixels instanceof Uint8Array) return { offset: 0, bins: 256 };
  if (pixels instanceof Int8Array) return { offset: 128, bins: 256 };
  if (pixels instanceof Uint16Array) return { offset: 0, bins: 65536 };
  if (pixels instanceof Int16Array) return { offset: 32768, bins: 65536 };
  if (pixels instanceof Float32Array || pixels instanceof Float64Array) {
    return null;
  }
  let min = Infinity;
  let max = -Infinity;
  const s = spans.spans;
  for (let k = 0; k < spans.count * 3; k += 3) {
    const base = s[k]! * columns;
    for (let i = base + s[k + 1]!, end = base + s[k + 2]!; i < end; i += 1) {
      const v = pixels[i]!;
      if (v < min) min = v;
      if (v > max) max = v;
    }
  }
  const bins = max - min + 1;
  return bins <= MAX_HISTOGRAM_BINS ? { offset: -min, bins } : null;
}

/** Occupied bins [low, high] of a filled histogram (low > high when none). */
interface BinRange {
  low: number;
  high: number;
}

/**
 * Counts the pixels into `histogram` (zeroed before) and returns the range
 * of bins it touched, so the passes over the histogram that follow (and
 * clearing it) stay within that range.
 */
function fillHistogram(
  pixels: PixelArray,
  columns: number,
  spans: RegionSpans,
  histogram: Uint32Array,
  offset: number,
  bins: number,
): BinRange {
  // Lanes pay off over many pixels; folding them costs 2¹⁸ additions.
  const large = spans.pixelCount >= LANE_THRESHOLD;
  if (large && LITTLE_ENDIAN && pixels instanceof Uint16Array && offset === 0) {
    return fillUint16Lanes(pixels, columns, spans, histogram);
  }
  if (
    large &&
    (pixels instanceof Uint16Array || pixels instanceof Int16Array)
  ) {
    return fillHistogram16(pixels, columns, spans, histogram, offset);
  }
  const s = spans.spans;
  if (spans.pixelCount >= bins) {
    for (let k = 0; k < spans.count * 3; k += 3) {
      const base = s[k]! * columns;
      const end = base + s[k + 2]!;
      for (let i = base + s[k + 1]!; i < end; i += 1) {
        histogram[pixels[i]! + offset]! += 1;
      }
    }
    return { low: 0, high: bins - 1 };
  }
  // A region smaller than the value range (a circle in 16-bit data) touches
  // few bins: note which, instead of walking all 65536 afterwards.
  let low = bins;
  let high = -1;
  for (let k = 0; k < spans.count * 3; k += 3) {
    const base = s[k]! * columns;
    const end = base + s[k + 2]!;
    for (let i = base + s[k + 1]!; i < end; i += 1) {
      const b = pixels[i]! + offset;
      histogram[b]! += 1;
      if (b < low) low = b;
      if (b > high) high = b;
    }
  }
  return { low, high };
}

/**
 * Sums the four interleaved lane counts into `histogram`, clears the lanes,
 * and returns the occupied bin range.
 */
function foldLanes(lanes: Uint32Array, histogram: Uint32Array): BinRange {
  let low = 65536;
  let high = -1;
  for (let b = 0, at = 0; b < 65536; b += 1, at += 4) {
    const count = lanes[at]! + lanes[at + 1]! + lanes[at + 2]! + lanes[at + 3]!;
    if (count !== 0) {
      histogram[b] = count;
      lanes[at] = 0;
      lanes[at + 1] = 0;
      lanes[at + 2] = 0;
      lanes[at + 3] = 0;
      if (low > b) low = b;
      high = b;
    }
  }
  return { low, high };
}

/**
 * Unsigned 16-bit histogram, reading two pixels per 32-bit load where a run
 * is 4-byte aligned, with four interleaved counters per value: neighbouring
 * pixels often share a value, and counting them into different slots of the
 * same cache line avoids waiting on the previous increment.
 */
function fillUint16Lanes(
  pixels: Uint16Array,
  columns: number,
  spans: RegionSpans,
  histogram: Uint32Array,
): BinRange {
  if (laneScratch.length < 4 * 65536) laneScratch = new Uint32Array(4 * 65536);
  const lanes = laneScratch;
  // Pixel i sits in the low half of a word when (i + odd) is even.
  const odd = (pixels.byteOffset >> 1) & 1;
  const words = new Uint32Array(
    pixels.buffer,
    pixels.byteOffset - 2 * odd,
    (pixels.length + odd) >> 1,
  );
  const s = spans.spans;
  for (let k = 0; k < spans.count * 3; k += 3) {
    const base = s[k]! * columns;
    const end = base + s[k + 2]!;
    let i = base + s[k + 1]!;
    if (((i + odd) & 1) === 1 && i < end) {
      lanes[pixels[i]! << 2]! += 1;
      i += 1;
    }
    let w = (i + odd) >> 1;
    for (; i + 3 < end; i += 4, w += 2) {
      const a = words[w]!;
      const b = words[w + 1]!;
      lanes[(a & 0xffff) << 2]! += 1;
      lanes[((a >>> 16) << 2) | 1]! += 1;
      lanes[((b & 0xffff) << 2) | 2]! += 1;
      lanes[((b >>> 16) << 2) | 3]! += 1;
    }
    for (; i < end; i += 1) lanes[pixels[i]! << 2]! += 1;
  }
  return foldLanes(lanes, histogram);
}

/** {@link fillUint16Lanes} for signed or offset 16-bit values, one pixel per load. */
function fillHistogram16(
  pixels: Uint16Array | Int16Array,
  columns: number,
  spans: RegionSpans,
  histogram: Uint32Array,
  offset: number,
): BinRange {
  if (laneScratch.length < 4 * 65536) laneScratch = new Uint32Array(4 * 65536);
  const lanes = laneScratch;
  const s = spans.spans;
  for (let k = 0; k < spans.count * 3; k += 3) {
    const base = s[k]! * columns;
    const end = base + s[k + 2]!;
    let i = base + s[k + 1]!;
    for (; i + 3 < end; i += 4) {
      lanes[(pixels[i]! + offset) << 2]! += 1;
      lanes[((pixels[i + 1]! + offset) << 2) | 1]! += 1;
      lanes[((pixels[i + 2]! + offset) << 2) | 2]! += 1;
      lanes[((pixels[i + 3]! + offset) << 2) | 3]! += 1;
    }
    for (; i < end; i += 1) lanes[(pixels[i]! + offset) << 2]! += 1;
  }
  return foldLanes(lanes, histogram);
}

/** Linear-interpolation percentile over sorted (signal, count) pairs. */
function percentileFromRuns(
  signals: Float64Array,
  cumulative: Float64Array,
  n: number,
  p: number,
): number {
  const h = (p / 100) * (n - 1);
  const lower = Math.floor(h);
  const fraction = h - lower;
  const at = (rank: number): number => {
    let lo = 0;
    let hi = cumulative.length - 1;
    while (lo < hi) {
      const mid = (lo + hi) >> 1;
      if (cumulative[mid]! > rank) hi = mid;
      else lo = mid + 1;
    }
    return signals[lo]!;
  };
  const a = at(lower);
  if (fraction === 0) return a;
  const b = at(Math.min(lower + 1, n - 1));
  return a + fraction * (b - a);
}

function summarise(
  signals: Float64Array,
  counts: Float64Array,
  percentiles: number[],
): RegionStatistics {
  let n = 0;
  const sum = new CompensatedSum();
  for (let k = 0; k < signals.length; k += 1) {
    n += counts[k]!;
    sum.add(counts[k]! * signals[k]!);
  }
  const mean = sum.value() / n;
  // Second moment about the mean, not Σx² − n·mean²: over 10⁷ 16-bit values
  // Σx² passes 2⁵³ and the difference would lose its low digits.
  const m2 = new CompensatedSum();
  for (let k = 0; k < signals.length; k += 1) {
    const d = signals[k]! - mean;
    m2.add(counts[k]! * d * d);
  }
  const cumulative = new Float64Array(signals.length);
  let running = 0;
  for (let k = 0; k < signals.length; k += 1) {
    running += counts[k]!;
    cumulative[k] = running;
  }
  const record: Record<string, number> = {};
  for (const p of percentiles) {
    record[String(p)] = percentileFromRuns(signals, cumulative, n, p);
  }
  return {
    n,
    mean,
    sampleSd: n > 1 ? Math.sqrt(m2.value() / (n - 1)) : 0,
    populationSd: Math.sqrt(m2.value() / n),
    min: signals[0]!,
    max: signals[signals.length - 1]!,
    median: percentileFromRuns(signals, cumulative, n, 50),
    percentiles: record,
  };
}

function histogramStatistics(
  pixels: PixelArray,
  columns: number,
  spans: RegionSpans,
  shape: { offset: number; bins: number },
  options: RegionStatisticsOptions,
): RegionStatistics {
  if (histogramScratch.length < shape.bins) {
    histogramScratch = new Uint32Array(shape.bins);
  }
  const histogram = histogramScratch;
  const { low, high } = fillHistogram(
    pixels,
    columns,
    spans,
    histogram,
    shape.offset,
    shape.bins,
  );
  try {
    let occupied = 0;
    for (let b = low; b <= high; b += 1) if (histogram[b]! > 0) occupied += 1;
    let signals = new Float64Array(occupied);
    let counts = new Float64Array(occupied);
    const lut = options.lut;
    let sorted = true;
    let k = 0;
    for (let b = low; b <= high; b += 1) {
      const c = histogram[b]!;
      if (c === 0) continue;
      const value = b - shape.offset;
      let signal = value;
      if (lut) {
        const index = value + lut.offset;
        if (!(index >= 0 && index < lut.table.length)) {
          fail(`Pixel value ${value} lies outside the linearisation table.`);
        }
        signal = lut.table[index]!;
        if (!Number.isFinite(signal)) {
          fail(`The linearisation table has no finite signal for ${value}.`);
        }
        if (k > 0 && signal < signals[k - 1]!) sorted = false;
      }
      signals[k] = signal;
      counts[k] = c;
      k += 1;
    }
    if (!sorted) {
      const order = Array.from({ length: occupied }, (_, i) => i).sort(
        (a, b) => signals[a]! - signals[b]!,
      );
      signals = Float64Array.from(order, (i) => signals[i]!);
      counts = Float64Array.from(order, (i) => counts[i]!);
    }
    return summarise(signals, counts, options.percentiles ?? []);
  } finally {
    if (high >= low) histogram.fill(0, low, high + 1);
  }
}

function sortedStatistics(
  pixels: PixelArray,
  columns: number,
  spans: RegionSpans,
  options: RegionStatisticsOptions,
  warnings: Warning[],
): RegionStatistics {
  if (options.lut) {
    fail(
      'A linearisation table applies to integer pixel data whose range it covers.',
    );
  }
  if (valueScratch.length < spans.pixelCount) {
    valueScratch = new Float64Array(spans.pixelCount);
  }
  const values = valueScratch;
  let n = 0;
  const s = spans.spans;
  for (let k = 0; k < spans.count * 3; k += 3) {
    const base = s[k]! * columns;
    for (let i = base + s[k + 1]!, end = base + s[k + 2]!; i < end; i += 1) {
      const v = pixels[i]!;
      if (Number.isFinite(v)) {
        values[n] = v;
        n += 1;
      }
    }
  }
  if (n < spans.pixelCount) {
    warnings.push({
      code: 'non_finite_pixels',
      message: `${spans.pixelCount - n} pixels in the region are not finite numbers and were left out.`,
    });
  }
  if (n === 0) {
    throw new DomainError(
      'region_empty',
      'The region holds no finite pixel values.',
    );
  }
  const sorted = values.subarray(0, n).sort();
  const counts = new Float64Array(n).fill(1);
  return summarise(sorted, counts, options.percentiles ?? []);
}

/**
 * Statistics of the pixels listed by `spans` (see {@link regionSpans}); for
 * callers that keep the spans of a region between requests.
 *
 * Integer data is histogrammed in one pass (no copy of the image): the sum is
 * exact, the second moment is taken about the mean with compensated
 * summation, and min, max, median and percentiles come from the histogram.
 * Float data (and integer data wider than 2²⁰ values) is copied into a
 * reused buffer and sorted; non-finite values are left out with a warning.
 *
 * @param pixels row-major image, one value per pixel.
 * @param columns image width in pixels.
 * @param spans pixels to measure; must hold at least one pixel.
 * @param options percentiles and an optional linearisation table.
 * @returns the statistics and any warnings.
 * @throws DomainError('region_empty') when no pixel is measured;
 *   DomainError('validation_failed') for a bad percentile or a table that
 *   does not cover the data.
 */
export function spanStatistics(
  pixels: PixelArray,
  columns: number,
  spans: RegionSpans,
  options: RegionStatisticsOptions = {},
): { stats: RegionStatistics; warnings: Warning[] } {
  const warnings: Warning[] = [];
  checkPercentiles(options.percentiles ?? []);
  if (spans.pixelCount === 0) {
    throw new DomainError(
      'region_empty',
      'The region holds no pixel of the image.',
    );
  }
  const shape = histogramShape(pixels, columns, spans);
  const stats = shape
    ? histogramStatistics(pixels, columns, spans, shape, options)
    : sortedStatistics(pixels, columns, spans, options, warnings);
  if (stats.n === 1) {
    warnings.push({
      code: 'single_pixel_region',
      message:
        'The region holds one pixel: its sample SD is undefined and is reported as 0.',
    });
  }
  return { stats, warnings };
}

/**
 * Statistics of the pixel values inside a region: count, mean, sample and
 * population SD, min, max, median and requested percentiles, all in Float64.
 *
 * @param pixels row-major image (modality values), one value per pixel.
 * @param columns image width in pixels.
 * @param rows image height in pixels.
 * @param region in pixel coordinates (pixel-centre rule of {@link Region}).
 * @param options percentiles (0–100) and an optional linearisation table,
 *   signal = table[value + offset], for integer data.
 * @returns the statistics and warnings: `region_clipped` when part of the
 *   region lies outside the image, `single_pixel_region`, `non_finite_pixels`.
 * @throws DomainError('region_empty') when no pixel of the image is inside;
 *   DomainError('region_invalid') for an invalid region;
 *   DomainError('validation_failed') when the buffer is shorter than
 *   columns × rows, for a bad percentile or a table not covering the data.
 * @see numpy.percentile (method "linear") for the percentile definition.
 */
export function regionStatistics(
  pixels: PixelArray,
  columns: number,
  rows: number,
  region: Region,
  options: RegionStatisticsOptions = {},
): { stats: RegionStatistics; warnings: Warning[] } {
  if (!(
    Number.isInteger(columns) &&
    Number.isInteger(rows) &&
    columns > 0 &&
    rows > 0
  )) {
    fail(
      `Image size ${columns} × ${rows} is not a positive whole number of pixels.`,
    );
  }
  if (pixels.length < columns * rows) {
    fail(
      `The pixel buffer holds ${pixels.length} values, fewer than ${columns} × ${rows}.`,
    );
  }
  const spans = regionSpans(region, columns, rows);
  if (spans.pixelCount === 0) {
    throw new DomainError(
      'region_empty',
      `The ${region.shape} holds no pixel of the ${columns} × ${rows} image.`,
    );
  }
  const result = spanStatistics(pixels, columns, spans, options);
  if (spans.clipped) {
    result.warnings.unshift({
      code: 'region_clipped',
      message: `Part of the ${region.shape} lies outside the image; only the ${spans.pixelCount} pixels inside were measured.`,
    });
  }
  return result;
}
