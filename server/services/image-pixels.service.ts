import { endianness } from 'node:os';
import { DomainError } from '../../shared/errors.ts';
import type { Region } from '../../shared/roi/region-geometry.ts';
import { validateRegion } from '../../shared/roi/region-geometry.ts';
import {
  regionStatistics,
  type PixelArray,
} from '../../shared/roi/region-statistics.ts';
import type { RegionStatsResultDto } from '../../shared/schemas/image.schema.ts';
import { decodeDicom, type DecodedImage } from '../dicom/decode-dicom.ts';
import type { Image } from '../models/image.model.ts';
import type { ImageStore } from './image-storage.service.ts';

// The pixels route sends typed arrays as they lie in memory and promises
// little-endian bytes; every platform Node ships for in practice is.
if (endianness() !== 'LE') {
  throw new Error('Lamella needs a little-endian host for its pixel routes.');
}

/** Decoded frame 0 of stored images, kept in memory between requests. */
export interface PixelCache {
  /** The decoded image, from memory or decoded from the store. */
  get(image: Pick<Image, 'sha256' | 'storageKey'>): Promise<DecodedImage>;
  /** Bytes currently held. */
  readonly sizeBytes: number;
}

/**
 * A least-recently-used cache of decoded images, bounded by the bytes their
 * pixel buffers hold, so a region editor's requests while dragging do not
 * re-read and re-decode the file. Concurrent requests for one image share
 * one decode. An image larger than the whole budget is decoded but not kept.
 *
 * @param store where the files are read from.
 * @param maxBytes the memory budget, in bytes.
 */
export function createPixelCache(
  store: ImageStore,
  maxBytes: number,
): PixelCache {
  const entries = new Map<string, { image: DecodedImage; bytes: number }>();
  const loading = new Map<string, Promise<DecodedImage>>();
  let sizeBytes = 0;

  const remember = (sha: string, image: DecodedImage): void => {
    const bytes = image.pixels.buffer.byteLength;
    if (bytes > maxBytes) return;
    entries.set(sha, { image, bytes });
    sizeBytes += bytes;
    for (const [key, entry] of entries) {
      if (sizeBytes <= maxBytes) break;
      entries.delete(key);
      sizeBytes -= entry.bytes;
    }
  };

  return {
    get sizeBytes() {
      return sizeBytes;
    },
    async get(image) {
      const hit = entries.get(image.sha256);
      if (hit) {
        // Re-insert so Map order stays least- to most-recently used.
        entries.delete(image.sha256);
        entries.set(image.sha256, hit);
        return hit.image;
      }
      const pending = loading.get(image.sha256);
      if (pending) return pending;
      const load = (async () => {
        const bytes = await store.read(image.storageKey);
        return decodeDicom(bytes, { frame: 0 });
      })();
      loading.set(image.sha256, load);
      try {
        const decoded = await load;
        remember(image.sha256, decoded);
        return decoded;
      } finally {
        loading.delete(image.sha256);
      }
    },
  };
}

const PIXEL_TYPE_NAMES: Array<[new (n: number) => PixelArray, string]> = [
  [Uint8Array, 'uint8'],
  [Int8Array, 'int8'],
  [Uint16Array, 'uint16'],
  [Int16Array, 'int16'],
  [Uint32Array, 'uint32'],
  [Int32Array, 'int32'],
  [Float32Array, 'float32'],
  [Float64Array, 'float64'],
];

/** The `X-Pixel-Type` name of a pixel buffer: uint16, int16, float64, … */
export function pixelTypeName(pixels: PixelArray): string {
  const found = PIXEL_TYPE_NAMES.find(([type]) => pixels instanceof type);
  if (!found) throw new Error('unknown pixel buffer type');
  return found[1];
}

/**
 * Every `step`-th row and column of an image, starting at (0, 0): plain
 * subsampling, so values stay the image's own (no averaging) and the type
 * is kept.
 *
 * @param step 1 returns the pixels unchanged.
 * @returns the subsampled buffer and its size, ⌈rows/step⌉ × ⌈columns/step⌉.
 */
export function decimatePixels(
  pixels: PixelArray,
  rows: number,
  columns: number,
  step: number,
): { pixels: PixelArray; rows: number; columns: number } {
  if (step === 1) return { pixels, rows, columns };
  const outRows = Math.ceil(rows / step);
  const outColumns = Math.ceil(columns / step);
  const Type = pixels.constructor as new (n: number) => PixelArray;
  const out = new Type(outRows * outColumns);
  for (let y = 0; y < outRows; y += 1) {
    const from = y * step * columns;
    const to = y * outColumns;
    for (let x = 0; x < outColumns; x += 1)
      out[to + x] = pixels[from + x * step]!;
  }
  return { pixels: out, rows: outRows, columns: outColumns };
}

/** The bytes of a pixel buffer, little-endian, without copying. */
export const pixelBytes = (pixels: PixelArray): Buffer =>
  Buffer.from(pixels.buffer, pixels.byteOffset, pixels.byteLength);

/**
 * Statistics of each region over an image's modality values. A region that
 * is invalid or holds no pixel gets its error in place of statistics, so one
 * bad region does not hide the others.
 *
 * @param percentiles 0–100, reported beside the median.
 * @see regionStatistics for the pixel-centre rule and the definitions.
 */
export function statisticsOfRegions(
  image: Pick<DecodedImage, 'pixels' | 'rows' | 'columns'>,
  regions: Region[],
  percentiles: number[] = [],
): RegionStatsResultDto[] {
  return regions.map((region) => {
    try {
      const { stats, warnings } = regionStatistics(
        image.pixels,
        image.columns,
        image.rows,
        validateRegion(region),
        { percentiles },
      );
      return { region, stats, warnings };
    } catch (error) {
      if (error instanceof DomainError) {
        return { region, error: { code: error.code, message: error.message } };
      }
      throw error;
    }
  });
}
