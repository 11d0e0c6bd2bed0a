import { DomainError } from '../errors.ts';
import type {
  PixelArray,
  SignalLookupTable,
} from '../roi/region-statistics.ts';

/**
 * A lookup table that turns stored values into signal for images whose
 * values fall as beam intensity rises (Pixel Intensity Relationship Sign −1,
 * or MONOCHROME1 without a sign): signal = (2^bitsStored − 1) − value.
 * Pass it as `lut` to regionStatistics.
 *
 * @param pixels the image's integer pixel array (8- or 16-bit).
 * @param bitsStored Bits Stored of the image.
 * @returns a table covering every value of the pixel array's type.
 * @throws DomainError('validation_failed') for 32-bit or float data.
 * @see DICOM PS3.3 C.8.11.3.1.2 (Pixel Intensity Relationship Sign).
 */
export function invertedSignalLut(
  pixels: PixelArray,
  bitsStored: number,
): SignalLookupTable {
  let size: number;
  let offset: number;
  if (pixels instanceof Uint8Array) [size, offset] = [256, 0];
  else if (pixels instanceof Int8Array) [size, offset] = [256, 128];
  else if (pixels instanceof Uint16Array) [size, offset] = [65536, 0];
  else if (pixels instanceof Int16Array) [size, offset] = [65536, 32768];
  else {
    throw new DomainError(
      'validation_failed',
      'An inverted-signal table needs 8- or 16-bit integer pixel data.',
    );
  }
  const max = 2 ** bitsStored - 1;
  const table = new Float64Array(size);
  for (let k = 0; k < size; k += 1) table[k] = max - (k - offset);
  return { table, offset };
}
