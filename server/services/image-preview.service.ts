import { randomUUID } from 'node:crypto';
import { mkdir, readFile, rename, rm, writeFile } from 'node:fs/promises';
import path from 'node:path';
import {
  PREVIEW_SIZES,
  type PreviewQuery,
} from '../../shared/schemas/image.schema.ts';
import { renderPreview } from '../dicom/render-preview.ts';
import type { Image } from '../models/image.model.ts';
import type { PixelCache } from './image-pixels.service.ts';

/**
 * Bumped whenever the renderer's output changes, so cached files and the
 * browsers' immutable copies are not reused across versions.
 */
const RENDER_VERSION = 1;

/** A preview request resolved to its cache identity. */
export interface PreviewKey {
  /** Opaque, quoted strong ETag for this image, size and window. */
  etag: string;
  /** True for the file's own (or automatic) window: safe to cache forever. */
  isDefaultWindow: boolean;
  /** File name under the preview folder. */
  fileName: string;
}

/** The cache identity of a preview; cheap, so 304s skip all rendering. */
export function previewKey(
  image: Pick<Image, 'sha256'>,
  query: PreviewQuery,
): PreviewKey {
  const window =
    query.wc === undefined || query.ww === undefined
      ? 'auto'
      : `c${query.wc}w${query.ww}`;
  const id = `${image.sha256}-${query.size}-${window}-r${RENDER_VERSION}`;
  return {
    etag: `"${id}"`,
    isDefaultWindow: window === 'auto',
    fileName: path.join(image.sha256.slice(0, 2), `${id}.png`),
  };
}

/** Rendered previews, cached as PNG files under `previewDir`. */
export interface PreviewCache {
  /** The PNG of a preview, from the disk cache or rendered and cached. */
  get(
    image: Pick<Image, 'sha256' | 'storageKey'>,
    query: PreviewQuery,
  ): Promise<Buffer>;
}

/**
 * Previews on disk keyed by hash, size and window. A preview is written to
 * a temp name and renamed, so a reader never sees half a PNG; two requests
 * racing to render one preview both succeed with equal files.
 *
 * @param previewDir folder for the cache (inside the uploads folder).
 * @param pixels where decoded images come from.
 */
export function createPreviewCache(
  previewDir: string,
  pixels: PixelCache,
): PreviewCache {
  return {
    async get(image, query) {
      const key = previewKey(image, query);
      const file = path.join(previewDir, key.fileName);
      try {
        return await readFile(file);
      } catch (error) {
        if ((error as NodeJS.ErrnoException).code !== 'ENOENT') throw error;
      }
      const decoded = await pixels.get(image);
      const png = await renderPreview(decoded, {
        maxSizePx: PREVIEW_SIZES[query.size],
        window:
          query.wc === undefined || query.ww === undefined
            ? undefined
            : { center: query.wc, width: query.ww },
      });
      await mkdir(path.dirname(file), { recursive: true });
      const temp = `${file}.${randomUUID()}.tmp`;
      try {
        await writeFile(temp, png);
        await rename(temp, file);
      } catch (error) {
        await rm(temp, { force: true });
        throw error;
      }
      return png;
    },
  };
}
