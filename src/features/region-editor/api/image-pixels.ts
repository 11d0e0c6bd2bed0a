import { queryOptions, useQuery } from '@tanstack/react-query';
import type { PixelArray } from '../../../../shared/roi/region-statistics.ts';
import { ApiError } from '../../../lib/api-client.ts';
import type { PixelImage } from '../model/windowing.ts';

const TYPES: Record<string, new (buffer: ArrayBuffer) => PixelArray> = {
  uint8: Uint8Array,
  int8: Int8Array,
  uint16: Uint16Array,
  int16: Int16Array,
  uint32: Uint32Array,
  int32: Int32Array,
  float32: Float32Array,
  float64: Float64Array,
};

/**
 * The full-resolution pixel array of an image (modality values), fetched
 * once: the editor reads values under the cursor and computes statistics
 * from it without asking the server again.
 * @throws ApiError for an error answer or a body that is not the promised array.
 */
export async function getImagePixels(imageId: number): Promise<PixelImage> {
  const response = await fetch(`/api/images/${imageId}/pixels`, {
    credentials: 'same-origin',
  });
  if (!response.ok) {
    const body = (await response.json().catch(() => ({}))) as {
      error?: { code?: ApiError['code']; message?: string };
    };
    throw new ApiError(
      response.status,
      body.error?.code ?? 'internal_error',
      body.error?.message ?? `The server answered ${response.status}.`,
    );
  }
  const rows = Number(response.headers.get('X-Rows'));
  const columns = Number(response.headers.get('X-Columns'));
  const Type = TYPES[response.headers.get('X-Pixel-Type') ?? ''];
  const buffer = await response.arrayBuffer();
  const pixels = Type ? new Type(buffer) : null;
  if (
    !pixels ||
    !(rows > 0 && columns > 0) ||
    pixels.length !== rows * columns
  ) {
    throw new ApiError(
      500,
      'internal_error',
      'The pixel data of this image could not be read.',
    );
  }
  return { pixels, rows, columns };
}

export const imagePixelsQueryOptions = (imageId: number) =>
  queryOptions({
    queryKey: ['region-editor', 'pixels', imageId],
    queryFn: () => getImagePixels(imageId),
    staleTime: Infinity,
    gcTime: 5 * 60_000,
  });

export const useImagePixels = (imageId: number) =>
  useQuery(imagePixelsQueryOptions(imageId));
