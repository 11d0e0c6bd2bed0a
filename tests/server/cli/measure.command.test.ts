import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { parseRegionSpec } from '../../../shared/roi/region-geometry.ts';
import { runLamella } from '../../helpers/dicom-cli.ts';
import { phantomPixels, writePhantom } from '../../helpers/dicom-phantom.ts';
import {
  PYDICOM_TEST_FILES,
  requireReferencePython,
  runReferenceScript,
} from '../../helpers/dicom-reference-python.ts';

const ROWS = 120;
const COLUMNS = 160;
let dir: string;
let file: string;
let raw: string;

beforeAll(() => {
  dir = mkdtempSync(path.join(tmpdir(), 'lamella-measure-'));
  const pixels = phantomPixels({
    rows: ROWS,
    columns: COLUMNS,
    bitsStored: 14,
    seed: 5,
  });
  file = writePhantom(dir, 'phantom.dcm', pixels, ROWS, COLUMNS, {
    KVP: 81,
    ExposureInuAs: 3200,
    ImagerPixelSpacing: [0.15, 0.15],
    BitsStored: 14,
  });
  raw = path.join(dir, 'phantom.raw');
  writeFileSync(raw, new Uint8Array(pixels.buffer));
});

afterAll(() => rmSync(dir, { recursive: true, force: true }));

function expectFailure(args: string[], code: string): void {
  const run = runLamella([...args, '--json']);
  expect(run.status).toBe(2);
  const body = JSON.parse(run.stdout) as {
    error: { code: string; message: string };
  };
  expect(Object.keys(body)).toEqual(['error']);
  expect(Object.keys(body.error)).toEqual(['code', 'message']);
  expect(body.error.code).toBe(code);
  // One line on stderr, never a stack trace.
  expect(run.stderr.trim().split('\n')).toHaveLength(1);
  expect(run.stderr).not.toMatch(/\n\s+at /);
}

describe('lamella measure', () => {
  it('prints exactly the contract’s JSON, with statistics equal to numpy’s', () => {
    requireReferencePython(['numpy']);
    const specs = ['circle:48,60,19', 'rect:90,20,50,40', 'circle:0,0,6'];

    const run = runLamella([
      'measure',
      file,
      ...specs.flatMap((s) => ['--roi', s]),
      '--json',
    ]);

    expect(run.status, run.stderr).toBe(0);
    expect(run.stdout.trim().split('\n')).toHaveLength(1);
    const body = JSON.parse(run.stdout);
    expect(Object.keys(body)).toEqual([
      'file',
      'rows',
      'columns',
      'frames',
      'transferSyntaxUid',
      'photometricInterpretation',
      'warnings',
      'rois',
    ]);
    expect(body).toMatchObject({
      file,
      rows: ROWS,
      columns: COLUMNS,
      frames: 1,
      transferSyntaxUid: '1.2.840.10008.1.2.1',
      photometricInterpretation: 'MONOCHROME2',
    });
    for (const w of body.warnings)
      expect(Object.keys(w)).toEqual(['code', 'message']);
    // circle:0,0,6 runs over the corner.
    expect(body.warnings.map((w: { code: string }) => w.code)).toEqual([
      'region_clipped',
    ]);
    // numpy on the same pixels and regions (tests/reference/numpy_roi.py).
    const expected = runReferenceScript<Array<Record<string, number>>>(
      'numpy_roi.py',
      [],
      {
        images: [{ path: raw, dtype: 'uint16', columns: COLUMNS, rows: ROWS }],
        cases: specs.map((s) => ({
          image: 0,
          region: parseRegionSpec(s),
          percentiles: [],
        })),
      },
    );
    body.rois.forEach((roi: Record<string, number | string>, i: number) => {
      expect(Object.keys(roi)).toEqual([
        'roi',
        'n',
        'mean',
        'sd',
        'sdPopulation',
        'min',
        'max',
        'median',
      ]);
      const ref = expected[i]!;
      expect(roi.roi).toBe(specs[i]);
      expect(roi.n).toBe(ref.n);
      expect(roi.mean).toBeCloseTo(ref.mean!, 9);
      expect(roi.sd).toBeCloseTo(ref.sampleSd!, 9);
      expect(roi.sdPopulation).toBeCloseTo(ref.populationSd!, 9);
      expect([roi.min, roi.max, roi.median]).toEqual([
        ref.min,
        ref.max,
        ref.median,
      ]);
    });
  });

  it('prints a table without --json', () => {
    const run = runLamella(['measure', file, '--roi', 'rect:0,0,10,10']);

    expect(run.status).toBe(0);
    expect(run.stdout).toContain('rect:0,0,10,10');
    expect(run.stdout).toMatch(/\bsdPopulation\b/);
  });

  it('fails with exit 2 and the error object for files and regions it cannot measure', () => {
    expectFailure(
      ['measure', path.join(dir, 'missing.dcm'), '--roi', 'circle:5,5,2'],
      'file_unreadable',
    );
    expectFailure(
      [
        'measure',
        path.join(PYDICOM_TEST_FILES, 'MR_truncated.dcm'),
        '--roi',
        'circle:5,5,2',
      ],
      'truncated_dicom',
    );
    expectFailure(
      [
        'measure',
        path.join(PYDICOM_TEST_FILES, 'SC_rgb_rle.dcm'),
        '--roi',
        'circle:5,5,2',
      ],
      'colour_image',
    );
    expectFailure(['measure', file, '--roi', 'circle:5,5'], 'region_invalid');
    expectFailure(
      ['measure', file, '--roi', 'rect:500,500,5,5'],
      'region_empty',
    );
    expectFailure(
      ['measure', file, '--roi', 'circle:5,5,2', '--frame', '1'],
      'frame_out_of_range',
    );
  });

  it('reports usage errors with code usage', () => {
    expectFailure(['measure', file], 'usage');
    expectFailure(['measure', '--roi', 'circle:1,1,1'], 'usage');
    expectFailure(
      ['measure', file, '--roi', 'circle:1,1,1', '--colour'],
      'usage',
    );
    expectFailure(
      ['measure', file, '--roi', 'circle:1,1,1', '--frame', 'two'],
      'usage',
    );
    expectFailure(['nonsense'], 'usage');
  });
});
