import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runLamella } from '../../helpers/dicom-cli.ts';
import { phantomPixels, writePhantom } from '../../helpers/dicom-phantom.ts';
import { PYDICOM_TEST_FILES } from '../../helpers/dicom-reference-python.ts';

let dir: string;
let file: string;

beforeAll(() => {
  dir = mkdtempSync(path.join(tmpdir(), 'lamella-inspect-'));
  file = writePhantom(
    dir,
    'phantom.dcm',
    phantomPixels({ rows: 32, columns: 40, bitsStored: 12 }),
    32,
    40,
    {
      BitsStored: 12,
      KVP: 70,
      Exposure: 4,
      Grid: ['FOCUSED'],
      GridFocalDistance: 1000,
      PresentationIntentType: 'FOR PRESENTATION',
      PatientName: 'Phantom^Chestwall',
      PatientID: 'SGH-PH-01',
    },
  );
});

afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('lamella inspect', () => {
  it('prints the decoded facts, acquisition data and warnings as JSON, without patient data', () => {
    const run = runLamella(['inspect', file, '--json']);

    expect(run.status, run.stderr).toBe(0);
    const body = JSON.parse(run.stdout);
    expect(body).toMatchObject({
      file,
      rows: 32,
      columns: 40,
      frames: 1,
      bitsStored: 12,
      transferSyntaxUid: '1.2.840.10008.1.2.1',
      transferSyntaxName: 'Explicit VR Little Endian',
      acquisition: {
        kvp: 70,
        exposureMas: 4,
        exposureMasSource: 'Exposure',
        grid: ['FOCUSED'],
        gridFocalDistanceMm: 1000,
      },
    });
    expect(body).not.toHaveProperty('pixels');
    expect(body.warnings.map((w: { code: string }) => w.code)).toEqual([
      'for_presentation',
      'missing_pixel_spacing',
      'patient_identifiers_present',
    ]);
    expect(run.stdout).not.toContain('Chestwall');
    expect(run.stdout).not.toContain('SGH-PH-01');
    expect(body.header).toHaveProperty('KVP', 70);
  });

  it('prints a readable summary without --json', () => {
    const run = runLamella(['inspect', file]);

    expect(run.status).toBe(0);
    expect(run.stdout).toContain('Explicit VR Little Endian');
    expect(run.stdout).toContain('for_presentation');
    expect(run.stdout).not.toContain('Chestwall');
  });

  it('fails with exit 2 and a one-line reason for a non-image', () => {
    const run = runLamella([
      'inspect',
      path.join(PYDICOM_TEST_FILES, 'rtplan.dcm'),
      '--json',
    ]);

    expect(run.status).toBe(2);
    expect(JSON.parse(run.stdout)).toEqual({
      error: { code: 'pixel_data_missing', message: expect.any(String) },
    });
    expect(run.stderr.trim().split('\n')).toHaveLength(1);
  });
});
