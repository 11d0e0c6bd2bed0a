// Region-editor benchmark: what POST /api/images/:id/region-stats and
// GET /api/images/:id/pixels do after the image row is loaded, for a
// 3000 × 3000 16-bit explicit VR little endian DX file in a disk store:
// the first request (read + decode into the pixel cache) and the requests
// while dragging (cache hit + statistics + JSON), each the median of RUNS
// runs after warm-up. Target: under 50 ms per dragging request.
import { createHash } from 'node:crypto';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import type { Region } from '../../../shared/roi/region-geometry.ts';
import { writeDicom } from '../../dicom/write-dicom.ts';
import {
  createPixelCache,
  decimatePixels,
  pixelBytes,
  statisticsOfRegions,
} from '../../services/image-pixels.service.ts';
import { createDiskImageStore } from '../../services/image-storage.service.ts';

const SIZE = 3000;
const RUNS = 15;
const WARM_UP = 3;

/** A flat field with a heel gradient and noise: deterministic, 16 bits. */
function phantom(): Uint16Array {
  const pixels = new Uint16Array(SIZE * SIZE);
  let state = 4242;
  for (let i = 0; i < pixels.length; i += 1) {
    state = (Math.imul(state, 1103515245) + 12345) >>> 0;
    pixels[i] =
      30000 + Math.round(((i % SIZE) / SIZE) * 6000) + ((state >>> 16) & 0x3ff);
  }
  return pixels;
}

async function medianMs(fn: () => Promise<unknown> | unknown): Promise<number> {
  for (let i = 0; i < WARM_UP; i += 1) await fn();
  const times: number[] = [];
  for (let i = 0; i < RUNS; i += 1) {
    const start = performance.now();
    await fn();
    times.push(performance.now() - start);
  }
  times.sort((a, b) => a - b);
  return times[Math.floor(times.length / 2)]!;
}

/** Object disc, background ring and a detail rectangle, as a CNR layout has. */
const EDITOR_REGIONS: Region[] = [
  { shape: 'circle', cx: 1500, cy: 1500, r: 300 },
  { shape: 'ring', cx: 1500, cy: 1500, rInner: 450, rOuter: 700 },
  { shape: 'rect', x0: 200, y0: 200, w: 600, h: 400 },
];
const WHOLE: Region[] = [{ shape: 'rect', x0: 0, y0: 0, w: SIZE, h: SIZE }];

/** Runs the section; figures in milliseconds. */
export async function run(): Promise<Record<string, number>> {
  const dir = mkdtempSync(path.join(tmpdir(), 'lamella-bench-regions-'));
  try {
    const store = createDiskImageStore(dir);
    const bytes = writeDicom({
      rows: SIZE,
      columns: SIZE,
      pixels: phantom(),
      attributes: {
        KVP: 70,
        ExposureInuAs: 2500,
        ImagerPixelSpacing: [0.143, 0.143],
      },
    });
    const sha256 = createHash('sha256').update(bytes).digest('hex');
    const temp = path.join(dir, 'upload.dcm');
    writeFileSync(temp, bytes);
    const image = { sha256, storageKey: await store.put(temp, sha256) };

    const coldMs = await medianMs(() =>
      createPixelCache(store, 512 * 1024 * 1024).get(image),
    );
    const cache = createPixelCache(store, 512 * 1024 * 1024);
    await cache.get(image);
    const request = async (regions: Region[]) =>
      JSON.stringify(
        statisticsOfRegions(await cache.get(image), regions, [5, 95]),
      );
    const draggingMs = await medianMs(() => request(EDITOR_REGIONS));
    const wholeImageMs = await medianMs(() => request(WHOLE));
    const pixelsDecimated4Ms = await medianMs(async () => {
      const decoded = await cache.get(image);
      return pixelBytes(decimatePixels(decoded.pixels, SIZE, SIZE, 4).pixels);
    });
    return {
      regionStatsColdMs: coldMs,
      regionStatsDraggingMs: draggingMs,
      regionStatsWholeImageMs: wholeImageMs,
      pixelsDecimated4Ms,
    };
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}
