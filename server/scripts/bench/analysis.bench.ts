// Analysis benchmark: on a generated 3000 × 3000 16-bit DX file, read +
// decode + 10 circles of radius 50 + one 1000 × 1000 rectangle + a
// 1500 × 1500 background plane fit + a 4096-bin histogram of the whole
// image, and the 1024-px preview; each the median of RUNS runs after
// warm-up (reads into a reused buffer, and also into a new one), beside
// tests/reference/numpy_bench.py doing the same steps with pydicom + numpy
// twice (idiomatic and tuned), run with Debian's python3. Ratios are
// Lamella ÷ numpy for read + analysis.
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { fitBackgroundPlane } from '../../../shared/analysis/background-plane.ts';
import { pixelHistogram } from '../../../shared/analysis/pixel-histogram.ts';
import type { Region } from '../../../shared/roi/region-geometry.ts';
import { regionSpans } from '../../../shared/roi/region-mask.ts';
import { regionStatistics } from '../../../shared/roi/region-statistics.ts';
import type { DecodedImage } from '../../dicom/decode-dicom.ts';
import { readDicomFile } from '../../dicom/decode-dicom.ts';
import { renderPreview } from '../../dicom/render-preview.ts';
import { writeDicom } from '../../dicom/write-dicom.ts';
import { renderPhantomImage } from '../../synthetic/phantom-image.ts';

const SIZE = 3000;
const RUNS = 15;
const WARM_UP = 3;
const BINS = 4096;
const PYTHON = '/usr/bin/python3';
const REFERENCE = path.resolve(
  import.meta.dirname,
  '../../../tests/reference/numpy_bench.py',
);

const CIRCLES: Array<[number, number, number]> = Array.from(
  { length: 10 },
  (_, i) => [300 + 260 * i, 400 + 220 * (i % 3), 50],
);
const RECT: [number, number, number, number] = [1000, 1000, 1000, 1000];
const PLANE: [number, number, number, number] = [750, 750, 1500, 1500];

const rect = ([x0, y0, w, h]: [number, number, number, number]): Region => ({
  shape: 'rect',
  x0,
  y0,
  w,
  h,
});

function phantomFile(dir: string): string {
  const pixels = renderPhantomImage({
    columns: SIZE,
    rows: SIZE,
    seed: 2026,
    pixelSpacingMm: 0.143,
    exposureMas: 10,
    primaryKermaUgyPerMas: 0.6,
    scatterToPrimaryRatio: 3,
    grid: null,
    kermaPerQuantumUgy: 0.002,
    object: { cx: 1500, cy: 1500, radiusPx: 300, primaryContrast: 0.1 },
    heelGradientPerPx: 0.00008,
    response: { model: 'linear', offset: 100, gainPerUgy: 1000 },
  });
  const file = path.join(dir, 'phantom-3000.dcm');
  writeFileSync(
    file,
    writeDicom({
      rows: SIZE,
      columns: SIZE,
      pixels,
      attributes: {
        KVP: 81,
        ExposureInuAs: 10000,
        ImagerPixelSpacing: [0.143, 0.143],
      },
    }),
  );
  return file;
}

/** The analysis steps after decoding, as the region editor runs them. */
function analyse(image: DecodedImage) {
  const { pixels, columns, rows } = image;
  const circles = CIRCLES.map(
    ([cx, cy, r]) =>
      regionStatistics(pixels, columns, rows, { shape: 'circle', cx, cy, r })
        .stats,
  );
  const rectangle = regionStatistics(pixels, columns, rows, rect(RECT)).stats;
  const plane = fitBackgroundPlane(pixels, columns, [
    regionSpans(rect(PLANE), columns, rows),
  ]);
  const histogram = pixelHistogram(
    pixels,
    columns,
    regionSpans(
      { shape: 'rect', x0: 0, y0: 0, w: columns, h: rows },
      columns,
      rows,
    ),
    { bins: BINS, rangeMin: 0, rangeMax: 65536 },
  );
  return { circles, rectangle, plane, histogram };
}

async function medianMs(fn: () => unknown): Promise<number> {
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

interface ReferenceFigures {
  circles: Array<{ n: number; mean: number; sd: number; median: number }>;
  rect: { n: number; mean: number; sd: number; median: number };
  plane: { slopeX: number; slopeY: number; sd: number };
  histogram: number[];
}

/** Fails the bench when a reference did different work from Lamella. */
function checkSameWork(
  name: string,
  lamella: ReturnType<typeof analyse>,
  reference: ReferenceFigures,
): void {
  const close = (a: number, b: number) =>
    Math.abs(a - b) <= 1e-6 * Math.max(1, Math.abs(b));
  const problems: string[] = [];
  lamella.circles.forEach((c, i) => {
    const r = reference.circles[i]!;
    if (
      c.n !== r.n ||
      !close(c.mean, r.mean) ||
      !close(c.sampleSd, r.sd) ||
      c.median !== r.median
    ) {
      problems.push(`circle ${i}`);
    }
  });
  const r = reference.rect;
  if (
    lamella.rectangle.n !== r.n ||
    !close(lamella.rectangle.mean, r.mean) ||
    lamella.rectangle.median !== r.median
  ) {
    problems.push('rectangle');
  }
  const p = reference.plane;
  if (
    !close(lamella.plane.slopeXPerPx, p.slopeX) ||
    !close(lamella.plane.slopeYPerPx, p.slopeY) ||
    !close(lamella.plane.sampleSdAboutPlane, p.sd)
  ) {
    problems.push('plane');
  }
  if (
    reference.histogram.some(
      (count, b) => count !== lamella.histogram.counts[b],
    )
  ) {
    problems.push('histogram');
  }
  if (problems.length > 0) {
    throw new Error(
      `bench analysis: the ${name} numpy reference disagrees on ${problems.join(', ')}.`,
    );
  }
}

/** Runs the section; times in ms, ratios Lamella ÷ numpy. */
export async function run(): Promise<Record<string, number | string>> {
  const dir = mkdtempSync(path.join(tmpdir(), 'lamella-bench-analysis-'));
  try {
    const file = phantomFile(dir);
    const image = await readDicomFile(file);
    const figures = analyse(image);
    // The timed loops read with reuseBuffer, as a batch that is done with
    // each image before the next would; a new buffer per read is timed too.
    const hot = { reuseBuffer: true };
    const readMs = await medianMs(() => readDicomFile(file, hot));
    const readFreshMs = await medianMs(() => readDicomFile(file));
    const circlesMs = await medianMs(() =>
      CIRCLES.map(([cx, cy, r]) =>
        regionStatistics(image.pixels, SIZE, SIZE, {
          shape: 'circle',
          cx,
          cy,
          r,
        }),
      ),
    );
    const rectMs = await medianMs(() =>
      regionStatistics(image.pixels, SIZE, SIZE, rect(RECT)),
    );
    const planeMs = await medianMs(() =>
      fitBackgroundPlane(image.pixels, SIZE, [
        regionSpans(rect(PLANE), SIZE, SIZE),
      ]),
    );
    const whole = regionSpans(
      { shape: 'rect', x0: 0, y0: 0, w: SIZE, h: SIZE },
      SIZE,
      SIZE,
    );
    const histogramMs = await medianMs(() =>
      pixelHistogram(image.pixels, SIZE, whole, {
        bins: BINS,
        rangeMin: 0,
        rangeMax: 65536,
      }),
    );
    const readAnalysisMs = await medianMs(async () =>
      analyse(await readDicomFile(file, hot)),
    );
    const readAnalysisFreshMs = await medianMs(async () =>
      analyse(await readDicomFile(file)),
    );
    const previewMs = await medianMs(() =>
      renderPreview(image, { maxSizePx: 1024 }),
    );

    const job = JSON.stringify({
      circles: CIRCLES,
      rect: RECT,
      plane: PLANE,
      bins: BINS,
    });
    const python = spawnSync(
      PYTHON,
      [REFERENCE, file, job, String(RUNS), String(WARM_UP)],
      {
        encoding: 'utf8',
        maxBuffer: 64 * 1024 * 1024,
      },
    );
    if (python.status !== 0) {
      throw new Error(
        `${PYTHON} ${REFERENCE} failed (needs python3-pydicom and python3-numpy): ${python.stderr || python.error?.message}`,
      );
    }
    const reference = JSON.parse(python.stdout) as {
      idiomaticMs: number;
      tunedMs: number;
      idiomatic: ReferenceFigures;
      tuned: ReferenceFigures;
    };
    checkSameWork('idiomatic', figures, reference.idiomatic);
    checkSameWork('tuned', figures, reference.tuned);
    return {
      image: `${SIZE}x${SIZE}`,
      readAnalysisMs,
      previewMs,
      numpyIdiomaticMs: reference.idiomaticMs,
      numpyTunedMs: reference.tunedMs,
      ratioToIdiomaticNumpy: readAnalysisMs / reference.idiomaticMs,
      ratioToTunedNumpy: readAnalysisMs / reference.tunedMs,
      readAnalysisFreshBufferMs: readAnalysisFreshMs,
      analysisReadDecodeMs: readMs,
      analysisReadDecodeFreshBufferMs: readFreshMs,
      analysisTenCirclesMs: circlesMs,
      analysisRectangleMs: rectMs,
      analysisPlaneFitMs: planeMs,
      analysisHistogramMs: histogramMs,
    };
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}
