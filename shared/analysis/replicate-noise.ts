import { DomainError } from '../errors.ts';
import type { RegionSpans } from '../roi/region-mask.ts';
import type {
  PixelArray,
  SignalLookupTable,
} from '../roi/region-statistics.ts';

/** Noise of a region from two replicate exposures. */
export interface ReplicateNoise {
  /** Pixels in the region. */
  n: number;
  /** Mean of first − second (a drift between the exposures), signal units. */
  meanDifference: number;
  /** Sample SD of the difference image in the region (divisor n − 1). */
  differenceSampleSd: number;
  /** differenceSampleSd / √2: the noise of one image without fixed pattern. */
  noiseSampleSd: number;
}

/**
 * Noise from two replicate images of the same set-up: the SD of the
 * difference image over the region divided by √2. Structure common to both
 * (grid lines, heel effect, phantom texture) cancels in the difference; the
 * random noise of each image adds in quadrature. One pass over the spans,
 * no difference image is made.
 *
 * @param first first replicate, row-major, same size as `second`.
 * @param second second replicate.
 * @param columns image width in pixels.
 * @param spans the region's pixels.
 * @param lut optional linearisation applied to both images.
 * @returns the difference statistics and the single-image noise SD.
 * @throws DomainError('validation_failed') when the images differ in size;
 *   DomainError('region_empty') with fewer than 2 pixels.
 * @see IEC 62220-1-1:2015 (noise from the difference of two flat fields,
 *   divided by √2, to remove fixed-pattern structure).
 */
export function replicateNoise(
  first: PixelArray,
  second: PixelArray,
  columns: number,
  spans: RegionSpans,
  lut?: SignalLookupTable,
): ReplicateNoise {
  if (first.length !== second.length) {
    throw new DomainError(
      'validation_failed',
      'Replicate images must have the same size to form a difference image.',
    );
  }
  if (spans.pixelCount < 2) {
    throw new DomainError(
      'region_empty',
      'A difference-image SD needs at least 2 pixels in the region.',
    );
  }
  const s = spans.spans;
  const table = lut?.table;
  const offset = lut?.offset ?? 0;
  const signal = (pixels: PixelArray, i: number): number =>
    table ? table[pixels[i]! + offset]! : pixels[i]!;
  const startIndex = s[0]! * columns + s[1]!;
  const shift = signal(first, startIndex) - signal(second, startIndex);
  let sum = 0;
  let sumSquares = 0;
  for (let k = 0; k < spans.count * 3; k += 3) {
    const base = s[k]! * columns;
    const end = base + s[k + 2]!;
    let rowSum = 0;
    let rowSquares = 0;
    if (table) {
      for (let i = base + s[k + 1]!; i < end; i += 1) {
        const d =
          table[first[i]! + offset]! - table[second[i]! + offset]! - shift;
        rowSum += d;
        rowSquares += d * d;
      }
    } else {
      for (let i = base + s[k + 1]!; i < end; i += 1) {
        const d = first[i]! - second[i]! - shift;
        rowSum += d;
        rowSquares += d * d;
      }
    }
    sum += rowSum;
    sumSquares += rowSquares;
  }
  const n = spans.pixelCount;
  const meanShifted = sum / n;
  const m2 = Math.max(0, sumSquares - n * meanShifted * meanShifted);
  const differenceSampleSd = Math.sqrt(m2 / (n - 1));
  if (!Number.isFinite(differenceSampleSd)) {
    throw new DomainError(
      'analysis_failed',
      'The difference image holds non-finite signal in the region.',
    );
  }
  return {
    n,
    meanDifference: shift + meanShifted,
    differenceSampleSd,
    noiseSampleSd: differenceSampleSd / Math.SQRT2,
  };
}
