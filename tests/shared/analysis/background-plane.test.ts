import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import {
  fitBackgroundPlane,
  planeSignalAt,
  planeStandardErrorAt,
  spansCentroid,
} from '../../../shared/analysis/background-plane.ts';
import { replicateNoise } from '../../../shared/analysis/replicate-noise.ts';
import type { Region } from '../../../shared/roi/region-geometry.ts';
import { regionSpans } from '../../../shared/roi/region-mask.ts';
import { createSeededRandom } from '../../../server/synthetic/seeded-random.ts';
import {
  requireReferencePython,
  runReferenceScript,
} from '../../helpers/dicom-reference-python.ts';

const COLUMNS = 240;
const ROWS = 180;

/** A tilted, noisy 16-bit image: 1000 + 2.5·x − 1.25·y + N(0, 20²). */
function tiltedImage(seed: number): Uint16Array {
  const random = createSeededRandom(seed);
  const pixels = new Uint16Array(COLUMNS * ROWS);
  for (let y = 0; y < ROWS; y += 1) {
    for (let x = 0; x < COLUMNS; x += 1) {
      const value =
        1000 + 2.5 * (x + 0.5) - 1.25 * (y + 0.5) + 20 * random.normal();
      pixels[y * COLUMNS + x] = Math.round(value);
    }
  }
  return pixels;
}

const workDir = mkdtempSync(path.join(tmpdir(), 'lamella-plane-'));
afterAll(() => rmSync(workDir, { recursive: true, force: true }));

function rawFile(name: string, pixels: Uint16Array): string {
  const file = path.join(workDir, name);
  writeFileSync(
    file,
    Buffer.from(pixels.buffer, pixels.byteOffset, pixels.byteLength),
  );
  return file;
}

describe('background plane fit', () => {
  const first = tiltedImage(11);
  const second = tiltedImage(12);
  const backgrounds: Region[] = [
    { shape: 'rect', x0: 5, y0: 10, w: 60, h: 150 },
    { shape: 'ring', cx: 150, cy: 90, rInner: 30, rOuter: 55 },
  ];
  const ring: Region = {
    shape: 'ring',
    cx: 150,
    cy: 90,
    rInner: 30,
    rOuter: 55,
  };

  it('agrees with numpy least squares over two background regions, and the difference SD with numpy', () => {
    requireReferencePython(['numpy']);
    const images = [
      {
        path: rawFile('first.raw', first),
        dtype: 'uint16',
        columns: COLUMNS,
        rows: ROWS,
      },
      {
        path: rawFile('second.raw', second),
        dtype: 'uint16',
        columns: COLUMNS,
        rows: ROWS,
      },
    ];
    const reference = runReferenceScript<{
      planes: Array<{
        intercept: number;
        slopeX: number;
        slopeY: number;
        n: number;
        sdAboutPlane: number;
        plainSd: number;
      }>;
      differences: Array<{
        n: number;
        meanDifference: number;
        differenceSd: number;
        noiseSd: number;
      }>;
    }>('numpy_analysis.py', [], {
      images,
      planes: [{ image: 0, regions: backgrounds }],
      differences: [{ first: 0, second: 1, region: ring }],
    });

    const plane = fitBackgroundPlane(
      first,
      COLUMNS,
      backgrounds.map((r) => regionSpans(r, COLUMNS, ROWS)),
    );
    const noise = replicateNoise(
      first,
      second,
      COLUMNS,
      regionSpans(ring, COLUMNS, ROWS),
    );

    // tests/reference/numpy_analysis.py (numpy.linalg.lstsq, ddof 3 / ddof 1).
    const p = reference.planes[0]!;
    expect(plane.n).toBe(p.n);
    expect(plane.intercept).toBeCloseTo(p.intercept, 8);
    expect(plane.slopeXPerPx).toBeCloseTo(p.slopeX, 10);
    expect(plane.slopeYPerPx).toBeCloseTo(p.slopeY, 10);
    expect(plane.sampleSdAboutPlane).toBeCloseTo(p.sdAboutPlane, 9);
    expect(plane.plainSampleSd).toBeCloseTo(p.plainSd, 9);
    // tests/reference/numpy_analysis.py (difference image, ddof 1, ÷ √2).
    const d = reference.differences[0]!;
    expect(noise.n).toBe(d.n);
    expect(noise.meanDifference).toBeCloseTo(d.meanDifference, 10);
    expect(noise.differenceSampleSd).toBeCloseTo(d.differenceSd, 10);
    expect(noise.noiseSampleSd).toBeCloseTo(d.noiseSd, 10);
  });

  it('removes the tilt: the SD about the plane is the noise, the plain SD is larger', () => {
    const plane = fitBackgroundPlane(first, COLUMNS, [
      regionSpans(
        { shape: 'rect', x0: 0, y0: 0, w: COLUMNS, h: ROWS },
        COLUMNS,
        ROWS,
      ),
    ]);

    expect(plane.slopeXPerPx).toBeCloseTo(2.5, 1);
    expect(plane.slopeYPerPx).toBeCloseTo(-1.25, 1);
    expect(planeSignalAt(plane, 0, 0)).toBeCloseTo(1000, -1);
    // Noise SD 20 plus rounding (1/12): √(400 + 1/12) ≈ 20.002.
    expect(plane.sampleSdAboutPlane).toBeGreaterThan(19.5);
    expect(plane.sampleSdAboutPlane).toBeLessThan(20.5);
    expect(plane.plainSampleSd).toBeGreaterThan(150);
  });

  it('scales with a linearisation table exactly as the signal does', () => {
    const table = new Float64Array(65536);
    for (let v = 0; v < table.length; v += 1) table[v] = 2 * v + 5;
    const spans = backgrounds.map((r) => regionSpans(r, COLUMNS, ROWS));

    const raw = fitBackgroundPlane(first, COLUMNS, spans);
    const mapped = fitBackgroundPlane(first, COLUMNS, spans, {
      table,
      offset: 0,
    });
    const noiseRaw = replicateNoise(first, second, COLUMNS, spans[0]!);
    const noiseMapped = replicateNoise(first, second, COLUMNS, spans[0]!, {
      table,
      offset: 0,
    });

    expect(mapped.intercept).toBeCloseTo(2 * raw.intercept + 5, 8);
    expect(mapped.slopeXPerPx).toBeCloseTo(2 * raw.slopeXPerPx, 10);
    expect(mapped.sampleSdAboutPlane).toBeCloseTo(
      2 * raw.sampleSdAboutPlane,
      9,
    );
    expect(noiseMapped.noiseSampleSd).toBeCloseTo(
      2 * noiseRaw.noiseSampleSd,
      9,
    );
  });

  it('predicts a smaller standard error at the centroid than far from it', () => {
    const plane = fitBackgroundPlane(first, COLUMNS, [
      regionSpans(ring, COLUMNS, ROWS),
    ]);
    const centre = spansCentroid(
      regionSpans({ shape: 'circle', cx: 150, cy: 90, r: 10 }, COLUMNS, ROWS),
    );

    expect(centre.xPx).toBeCloseTo(150, 10);
    expect(centre.yPx).toBeCloseTo(90, 10);
    expect(planeStandardErrorAt(plane, 150, 90)).toBeCloseTo(
      plane.sampleSdAboutPlane / Math.sqrt(plane.n),
      3,
    );
    expect(planeStandardErrorAt(plane, 10, 10)).toBeGreaterThan(
      3 * planeStandardErrorAt(plane, 150, 90),
    );
  });

  it('refuses a background on one row and one with under 4 pixels', () => {
    const row = regionSpans(
      { shape: 'rect', x0: 0, y0: 5, w: 50, h: 1 },
      COLUMNS,
      ROWS,
    );
    const tiny = regionSpans(
      { shape: 'rect', x0: 0, y0: 0, w: 1, h: 3 },
      COLUMNS,
      ROWS,
    );

    expect(() => fitBackgroundPlane(first, COLUMNS, [row])).toThrow(
      expect.objectContaining({ code: 'analysis_failed' }),
    );
    expect(() => fitBackgroundPlane(first, COLUMNS, [tiny])).toThrow(
      expect.objectContaining({ code: 'region_empty' }),
    );
  });

  it('refuses replicates of different size', () => {
    expect(() =>
      replicateNoise(
        first,
        new Uint16Array(10),
        COLUMNS,
        regionSpans(ring, COLUMNS, ROWS),
      ),
    ).toThrow(expect.objectContaining({ code: 'validation_failed' }));
  });
});
