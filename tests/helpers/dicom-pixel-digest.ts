import { createHash } from 'node:crypto';
import type { PixelArray } from '../../shared/roi/region-statistics.ts';

/** Sum, sum of squares and SHA-256 of pixel values as little-endian float64. */
export interface PixelDigest {
  sum: number;
  sumSquares: number;
  sha256: string;
}

/**
 * Digest comparable with tests/reference/pydicom_pixels.py: the values as
 * float64 (exact for every integer type used) hashed in order.
 */
export function pixelDigest(pixels: PixelArray): PixelDigest {
  const values = Float64Array.from(pixels);
  let sum = 0;
  let sumSquares = 0;
  for (const v of values) {
    sum += v;
    sumSquares += v * v;
  }
  return {
    sum,
    sumSquares,
    sha256: createHash('sha256')
      .update(new Uint8Array(values.buffer))
      .digest('hex'),
  };
}
