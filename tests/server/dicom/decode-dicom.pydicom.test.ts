import { existsSync, readdirSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { DicomError } from '../../../server/dicom/dicom-error.ts';
import { readDicomFile } from '../../../server/dicom/decode-dicom.ts';
import { pixelDigest } from '../../helpers/dicom-pixel-digest.ts';
import {
  PYDICOM_TEST_FILES,
  requireReferencePython,
  runReferenceScript,
} from '../../helpers/dicom-reference-python.ts';

interface Reference {
  file: string;
  frame: number;
  ok: boolean;
  error?: string;
  rows?: number;
  columns?: number;
  frames?: number;
  samples?: number;
  sum?: number;
  sumSquares?: number;
  sha256?: string;
}

/**
 * Files pydicom reads but Lamella rejects on purpose, with the reason.
 * MR_small_padded.dcm: 8320 bytes of Pixel Data for 64 × 64 × 16 bits (8192);
 * pydicom warns and uses the first 8192, while Lamella treats any length
 * other than Rows × Columns × Bits Allocated × frames (plus one pad byte) as
 * an error, because a wrong Rows or Columns looks exactly like this.
 */
const REJECTED_ON_PURPOSE: Record<string, string> = {
  'MR_small_padded.dcm': 'pixel_data_length_mismatch',
};

/**
 * Files pydicom cannot decode on Debian (no JPEG-LS or 12-bit JPEG plug-in)
 * but whose pixels are known: pydicom's README says MR_small_jpeg_ls_lossless
 * is MR_small compressed losslessly.
 */
const SAME_PIXELS_AS: Record<string, string> = {
  'MR_small_jpeg_ls_lossless.dcm': 'MR_small.dcm',
};

/** Broken files and the code each must be rejected with. */
const EXPECTED_REJECTIONS: Record<string, string> = {
  'MR_truncated.dcm': 'truncated_dicom',
  'rtplan_truncated.dcm': 'truncated_dicom',
  'JPEG2000-embedded-sequence-delimiter.dcm': 'malformed_dicom',
  'badVR.dcm': 'malformed_dicom',
  'no_meta.dcm': 'not_dicom',
  'ExplVR_BigEnd.dcm': 'colour_image',
  'SC_rgb_rle.dcm': 'colour_image',
  'SC_rgb_jpeg_dcmtk.dcm': 'colour_image',
  'GDCMJ2K_TextGBR.dcm': 'colour_image',
  'rtplan.dcm': 'pixel_data_missing',
  'ExplVR_BigEndNoMeta.dcm': 'pixel_data_missing',
  'ExplVR_LitEndNoMeta.dcm': 'pixel_data_missing',
  'test-SR.dcm': 'pixel_data_missing',
};

const dir = PYDICOM_TEST_FILES;

function allFiles(): string[] {
  if (!existsSync(dir)) {
    throw new Error(
      `pydicom's test files are missing at ${dir}: install Debian's python3-pydicom (apt-get install -y python3-pydicom).`,
    );
  }
  return readdirSync(dir)
    .filter((f) => f.endsWith('.dcm'))
    .sort();
}

describe("decoding pydicom's test files (Debian python3-pydicom)", () => {
  it('gives the same modality values as pydicom + numpy for every greyscale image it reads', async () => {
    requireReferencePython(['pydicom', 'numpy']);
    const files = allFiles();
    // tests/reference/pydicom_pixels.py decodes each file independently.
    const references = runReferenceScript<Reference[]>(
      'pydicom_pixels.py',
      files.map((f) => path.join(dir, f)),
    );
    const greyscale = references.filter(
      (r) => r.ok && r.samples === 1 && r.frames === 1,
    );
    expect(greyscale.length).toBeGreaterThanOrEqual(15);

    const compared: string[] = [];
    for (const reference of greyscale) {
      const name = path.basename(reference.file);
      if (REJECTED_ON_PURPOSE[name]) {
        await expect(readDicomFile(reference.file)).rejects.toMatchObject({
          code: REJECTED_ON_PURPOSE[name],
        });
        continue;
      }
      const image = await readDicomFile(reference.file);
      const digest = pixelDigest(image.pixels);
      expect({ name, rows: image.rows, columns: image.columns }).toEqual({
        name,
        rows: reference.rows,
        columns: reference.columns,
      });
      expect({ name, sha256: digest.sha256 }).toEqual({
        name,
        sha256: reference.sha256,
      });
      expect(digest.sum).toBeCloseTo(reference.sum!, 6);
      expect(digest.sumSquares / reference.sumSquares!).toBeCloseTo(1, 12);
      compared.push(name);
    }
    // The syntaxes pydicom covers: explicit/implicit LE, big endian, deflate,
    // RLE, JPEG 2000 (both), bit-packed and 32-bit data.
    expect(compared).toEqual(
      expect.arrayContaining([
        'CT_small.dcm',
        'MR_small_implicit.dcm',
        'MR_small_bigendian.dcm',
        'MR_small_RLE.dcm',
        'MR_small_jp2klossless.dcm',
        'J2K_pixelrep_mismatch.dcm',
        '693_J2KI.dcm',
        'JPEG2000.dcm',
        'image_dfl.dcm',
        'liver_1frame.dcm',
        'rtdose_expb_1frame.dcm',
        'rtdose_rle_1frame.dcm',
      ]),
    );
  });

  it('decodes every frame of the multi-frame files as pydicom does', async () => {
    requireReferencePython(['pydicom', 'numpy']);
    const args: string[] = [];
    for (const name of ['rtdose.dcm', 'rtdose_expb.dcm', 'rtdose_rle.dcm']) {
      for (const frame of [0, 7, 14])
        args.push(`${path.join(dir, name)}:${frame}`);
    }
    const references = runReferenceScript<Reference[]>(
      'pydicom_pixels.py',
      args,
    );

    for (const reference of references) {
      expect(reference.ok).toBe(true);
      const image = await readDicomFile(reference.file, {
        frame: reference.frame,
      });
      expect(image.frames).toBe(15);
      expect(pixelDigest(image.pixels).sha256).toBe(reference.sha256);
    }
    await expect(
      readDicomFile(path.join(dir, 'rtdose.dcm'), { frame: 15 }),
    ).rejects.toMatchObject({ code: 'frame_out_of_range' });
  });

  it('decodes the JPEG-LS file to the pixels of the uncompressed original', async () => {
    for (const [name, original] of Object.entries(SAME_PIXELS_AS)) {
      const [a, b] = await Promise.all([
        readDicomFile(path.join(dir, name)),
        readDicomFile(path.join(dir, original)),
      ]);
      expect(pixelDigest(a.pixels)).toEqual(pixelDigest(b.pixels));
    }
  });

  it('rejects the truncated, malformed, colour and non-image files with the right code', async () => {
    for (const [name, code] of Object.entries(EXPECTED_REJECTIONS)) {
      const result = readDicomFile(path.join(dir, name));
      await expect(result, name).rejects.toBeInstanceOf(DicomError);
      await expect(result, name).rejects.toMatchObject({ code });
    }
  });

  it('returns a result or a DicomError for every file, never anything else', async () => {
    for (const name of allFiles()) {
      try {
        const image = await readDicomFile(path.join(dir, name));
        expect(image.pixels.length).toBe(image.rows * image.columns);
      } catch (error) {
        expect(error, name).toBeInstanceOf(DicomError);
      }
    }
  });
});
