// Decode benchmark: a 3000 × 3000 16-bit explicit VR little endian DX file,
// read + parse + decode (+ one full-image statistics pass), and the 1024-px
// preview, each the median of RUNS runs after warm-up (reads into a reused
// buffer, and also into a new one), beside the same work in pydicom + numpy
// (tests/reference/pydicom_bench.py, Debian's python3).
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { regionStatistics } from '../../../shared/roi/region-statistics.ts';
import { readDicomFile } from '../../dicom/decode-dicom.ts';
import { renderPreview } from '../../dicom/render-preview.ts';
import { writeDicom } from '../../dicom/write-dicom.ts';

const SIZE = 3000;
const RUNS = 15;
const WARM_UP = 3;
const PYTHON = '/usr/bin/python3';
const REFERENCE = path.resolve(
  import.meta.dirname,
  '../../../tests/reference/pydicom_bench.py',
);

/** A flat field with a heel gradient and noise: deterministic, 16 bits. */
function phantom(): Uint16Array {
  const pixels = new Uint16Array(SIZE * SIZE);
  let state = 12345;
  for (let y = 0; y < SIZE; y += 1) {
    for (let x = 0; x < SIZE; x += 1) {
      state = (Math.imul(state, 1103515245) + 12345) >>> 0;
      const noise = ((state >>> 16) & 0x3ff) - 512;
      pixels[y * SIZE + x] = 30000 + Math.round((x / SIZE) * 6000) + noise;
    }
  }
  return pixels;
}

async function medianMs(fn: () => Promise<unknown>): Promise<number> {
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

const whole = { shape: 'rect', x0: 0, y0: 0, w: SIZE, h: SIZE } as const;

/** Runs the section; figures in milliseconds, ratios pydicom ÷ Lamella. */
export async function run(): Promise<Record<string, number>> {
  const dir = mkdtempSync(path.join(tmpdir(), 'lamella-bench-'));
  try {
    const file = path.join(dir, 'dx-3000.dcm');
    writeFileSync(
      file,
      writeDicom({
        rows: SIZE,
        columns: SIZE,
        pixels: phantom(),
        attributes: {
          KVP: 70,
          ExposureInuAs: 2500,
          ImagerPixelSpacing: [0.143, 0.143],
        },
      }),
    );
    const image = await readDicomFile(file);
    // Timed with reuseBuffer, as a loop that is done with each image before
    // the next read; a new buffer per read is timed too.
    const hot = { reuseBuffer: true };
    const readDecodeMs = await medianMs(() => readDicomFile(file, hot));
    const readDecodeFreshMs = await medianMs(() => readDicomFile(file));
    const statsMs = await medianMs(async () =>
      regionStatistics(image.pixels, SIZE, SIZE, whole),
    );
    const readDecodeStatsMs = await medianMs(async () => {
      const decoded = await readDicomFile(file, hot);
      return regionStatistics(decoded.pixels, SIZE, SIZE, whole);
    });
    const previewMs = await medianMs(() =>
      renderPreview(image, { maxSizePx: 1024 }),
    );

    const python = spawnSync(PYTHON, [REFERENCE, file, String(RUNS)], {
      encoding: 'utf8',
    });
    if (python.status !== 0) {
      throw new Error(
        `${PYTHON} ${REFERENCE} failed (needs python3-pydicom, python3-numpy, python3-pil): ${python.stderr || python.error?.message}`,
      );
    }
    const reference = JSON.parse(python.stdout) as Record<string, number>;
    return {
      dicomReadDecodeMs: readDecodeMs,
      dicomReadDecodeFreshBufferMs: readDecodeFreshMs,
      dicomStatsMs: statsMs,
      dicomReadDecodeStatsMs: readDecodeStatsMs,
      dicomPreviewMs: previewMs,
      pydicomReadDecodeMs: reference.readDecodeMs!,
      pydicomStatsMs: reference.statsMs!,
      pydicomReadDecodeStatsMs: reference.readDecodeStatsMs!,
      pydicomPreviewMs: reference.previewMs!,
      dicomReadDecodeRatio: reference.readDecodeMs! / readDecodeMs,
      dicomReadDecodeStatsRatio:
        reference.readDecodeStatsMs! / readDecodeStatsMs,
      dicomPreviewRatio: reference.previewMs! / previewMs,
    };
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}
