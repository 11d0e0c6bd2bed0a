import { createHash } from 'node:crypto';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import {
  createPixelCache,
  decimatePixels,
  pixelTypeName,
  statisticsOfRegions,
} from '../../../server/services/image-pixels.service.ts';
import { createPreviewCache } from '../../../server/services/image-preview.service.ts';
import {
  createDiskImageStore,
  type ImageStore,
} from '../../../server/services/image-storage.service.ts';
import {
  filesUnder,
  phantomDicom,
  scratchDir,
  writeFile,
} from '../../helpers/dicom-files.ts';

const root = scratchDir('image-pixels/store');

/** A store that counts reads, over a real disk store. */
function countingStore(): ImageStore & { reads: number } {
  const store = createDiskImageStore(root);
  const counting = {
    ...store,
    reads: 0,
    read(key: string) {
      counting.reads += 1;
      return store.read(key);
    },
  };
  return counting;
}

async function storedPhantom(
  store: ImageStore,
  seed: number,
  rows = 40,
  columns = 50,
) {
  const bytes = phantomDicom({ seed, rows, columns });
  const sha256 = createHash('sha256').update(bytes).digest('hex');
  const temp = writeFile(store.tempDir, `t-${sha256}`, bytes);
  return { sha256, storageKey: await store.put(temp, sha256) };
}

describe('createPixelCache', () => {
  it('decodes an image once, sharing the decode between concurrent requests', async () => {
    const store = countingStore();
    const image = await storedPhantom(store, 81);
    const cache = createPixelCache(store, 10_000_000);
    const [a, b] = await Promise.all([cache.get(image), cache.get(image)]);
    const c = await cache.get(image);
    expect(store.reads).toBe(1);
    expect(a).toBe(b);
    expect(c).toBe(a);
    expect([a.rows, a.columns]).toEqual([40, 50]);
  });

  it('evicts the least recently used image when the byte budget is exceeded', async () => {
    const store = countingStore();
    const first = await storedPhantom(store, 82);
    const second = await storedPhantom(store, 83);
    const probe = createPixelCache(store, 10_000_000);
    const firstBytes = (await probe.get(first)).pixels.buffer.byteLength;
    const secondBytes = (await probe.get(second)).pixels.buffer.byteLength;
    const bothBytes = firstBytes + secondBytes;
    store.reads = 0;

    const cache = createPixelCache(store, bothBytes - 1);
    await cache.get(first);
    await cache.get(second);
    expect(store.reads).toBe(2);
    // The first image was evicted; only the second is held.
    expect(cache.sizeBytes).toBe(secondBytes);
    await cache.get(second);
    expect(store.reads).toBe(2);
    await cache.get(first);
    expect(store.reads).toBe(3);
  });
});

describe('decimatePixels', () => {
  it('keeps every N-th row and column from (0, 0), with the type kept', () => {
    // 3 × 5 image, values = 10·row + column (hand-checkable).
    const pixels = Int16Array.from(
      { length: 15 },
      (_, i) => 10 * Math.floor(i / 5) + (i % 5),
    );
    const out = decimatePixels(pixels, 3, 5, 2);
    expect([out.rows, out.columns]).toEqual([2, 3]);
    expect([...out.pixels]).toEqual([0, 2, 4, 20, 22, 24]);
    expect(pixelTypeName(out.pixels)).toBe('int16');
  });
});

describe('statisticsOfRegions', () => {
  it('returns statistics per region and an error in place of an invalid one', () => {
    // 2 × 2 image [1 2; 3 4]: the whole-image mean is 2.5 (by hand).
    const image = {
      pixels: Uint16Array.from([1, 2, 3, 4]),
      rows: 2,
      columns: 2,
    };
    const [whole, invalid] = statisticsOfRegions(image, [
      { shape: 'rect', x0: 0, y0: 0, w: 2, h: 2 },
      { shape: 'circle', cx: 1, cy: 1, r: -1 },
    ]);
    expect(whole).toMatchObject({ stats: { n: 4, mean: 2.5, min: 1, max: 4 } });
    expect(invalid).toMatchObject({ error: { code: 'region_invalid' } });
  });
});

describe('createPreviewCache', () => {
  it('writes each preview once to disk and serves it from there afterwards', async () => {
    const store = countingStore();
    const image = await storedPhantom(store, 84, 60, 90);
    const previewDir = path.join(root, 'previews');
    const previews = createPreviewCache(previewDir, createPixelCache(store, 0));
    const first = await previews.get(image, { size: 'thumb' });
    const again = await previews.get(image, { size: 'thumb' });
    expect(again.equals(first)).toBe(true);
    expect(store.reads).toBe(1);
    const windowed = await previews.get(image, {
      size: 'thumb',
      wc: 1500,
      ww: 300,
    });
    expect(windowed.equals(first)).toBe(false);
    expect(
      filesUnder(previewDir).filter((f) => f.endsWith('.png')),
    ).toHaveLength(2);
    expect(filesUnder(previewDir).filter((f) => f.endsWith('.tmp'))).toEqual(
      [],
    );
  });
});
