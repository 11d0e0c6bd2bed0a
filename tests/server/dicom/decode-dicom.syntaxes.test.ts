import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { readDicomFile } from '../../../server/dicom/decode-dicom.ts';
import {
  dcmtk,
  phantomPixels,
  writePhantom,
} from '../../helpers/dicom-phantom.ts';

const ROWS = 96;
const COLUMNS = 128;
const DX_ATTRIBUTES = {
  KVP: 70,
  ExposureInuAs: 2500,
  ImagerPixelSpacing: [0.143, 0.143],
  Grid: ['FOCUSED', 'RECIPROCATING'],
  StationName: 'SGH-DX1',
};

let dir: string;
const originals: Record<string, Uint16Array | Int16Array> = {};
const sources: Record<string, string> = {};

beforeAll(() => {
  dir = mkdtempSync(path.join(tmpdir(), 'lamella-syntax-'));
  const phantoms = {
    u12: { bitsStored: 12, signed: false },
    s12: { bitsStored: 12, signed: true },
    u16: { bitsStored: 16, signed: false },
    u8: { bitsStored: 8, signed: false },
  };
  for (const [name, p] of Object.entries(phantoms)) {
    const pixels = phantomPixels({
      rows: ROWS,
      columns: COLUMNS,
      ...p,
      seed: 3,
    });
    originals[name] = pixels;
    sources[name] = writePhantom(dir, `${name}.dcm`, pixels, ROWS, COLUMNS, {
      ...DX_ATTRIBUTES,
      BitsStored: p.bitsStored,
    });
  }
});

afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** Converts a source phantom with a dcmtk tool and returns the output path. */
function convert(
  source: string,
  tool: string,
  args: string[],
  name: string,
): string {
  const out = path.join(dir, `${source}-${name}.dcm`);
  dcmtk(tool, [...args, sources[source]!, out]);
  return out;
}

// Lossless conversions by Debian's dcmtk 3.6.7; each must decode to exactly
// the pixels writeDicom was given. dcmtk 3.6.7 has no JPEG 2000 encoder: that
// syntax is checked on pydicom's J2K files (decode-dicom.pydicom.test.ts).
const LOSSLESS: Array<[string, string, string[], string, string]> = [
  ['u12', 'dcmconv', ['+ti'], 'implicit', '1.2.840.10008.1.2'],
  ['u12', 'dcmconv', ['+tb'], 'big-endian', '1.2.840.10008.1.2.2'],
  ['u12', 'dcmconv', ['+td'], 'deflated', '1.2.840.10008.1.2.1.99'],
  ['u12', 'dcmcrle', [], 'rle', '1.2.840.10008.1.2.5'],
  ['u12', 'dcmcjpeg', ['+el'], 'jpeg-lossless', '1.2.840.10008.1.2.4.57'],
  ['u12', 'dcmcjpeg', ['+e1'], 'jpeg-lossless-sv1', '1.2.840.10008.1.2.4.70'],
  ['u12', 'dcmcjpls', [], 'jpeg-ls', '1.2.840.10008.1.2.4.80'],
  ['u16', 'dcmconv', ['+tb'], 'big-endian', '1.2.840.10008.1.2.2'],
  ['u16', 'dcmcrle', [], 'rle', '1.2.840.10008.1.2.5'],
  ['u16', 'dcmcjpeg', ['+e1'], 'jpeg-lossless-sv1', '1.2.840.10008.1.2.4.70'],
  ['u16', 'dcmcjpls', [], 'jpeg-ls', '1.2.840.10008.1.2.4.80'],
  ['s12', 'dcmconv', ['+ti'], 'implicit', '1.2.840.10008.1.2'],
  ['s12', 'dcmconv', ['+tb'], 'big-endian', '1.2.840.10008.1.2.2'],
  ['s12', 'dcmcrle', [], 'rle', '1.2.840.10008.1.2.5'],
  ['s12', 'dcmcjpeg', ['+e1'], 'jpeg-lossless-sv1', '1.2.840.10008.1.2.4.70'],
  ['s12', 'dcmcjpls', [], 'jpeg-ls', '1.2.840.10008.1.2.4.80'],
  ['u12', 'dcmconv', ['-F', '+ti'], 'bare-implicit', '1.2.840.10008.1.2'],
  ['u12', 'dcmconv', ['-F', '+te'], 'bare-explicit', '1.2.840.10008.1.2.1'],
  ['u12', 'dcmconv', ['-F', '+tb'], 'bare-big-endian', '1.2.840.10008.1.2.2'],
];

// Lossy conversions: compared with dcmtk's own decompression (dcmdjpeg,
// dcmdjpls) of the same file. For 12-bit JPEG (.51) Lamella itself decodes
// with dcmdjpeg, so that row checks frame handling, not the codec.
const LOSSY: Array<[string, string, string[], string, string, string]> = [
  [
    'u8',
    'dcmcjpeg',
    ['+eb'],
    'jpeg-baseline',
    '1.2.840.10008.1.2.4.50',
    'dcmdjpeg',
  ],
  [
    'u12',
    'dcmcjpeg',
    ['+ee'],
    'jpeg-extended',
    '1.2.840.10008.1.2.4.51',
    'dcmdjpeg',
  ],
  [
    'u12',
    'dcmcjpls',
    ['+en'],
    'jpeg-ls-near',
    '1.2.840.10008.1.2.4.81',
    'dcmdjpls',
  ],
];

describe('decoding synthetic DX phantoms converted by dcmtk', () => {
  it('reads the explicit VR little endian original back exactly', async () => {
    for (const name of Object.keys(originals)) {
      const image = await readDicomFile(sources[name]!);
      expect(Array.from(image.pixels)).toEqual(Array.from(originals[name]!));
      expect(image.warnings.map((w) => w.code)).toEqual([]);
    }
  });

  it.each(LOSSLESS)(
    '%s via %s %j (%s) decodes to the identical pixels',
    async (source, tool, args, name, syntax) => {
      const file = convert(source, tool, args, name);

      const image = await readDicomFile(file);

      expect(image.transferSyntaxUid).toBe(syntax);
      expect(image.pixels).toBeInstanceOf(
        source === 's12' ? Int16Array : Uint16Array,
      );
      expect(Array.from(image.pixels)).toEqual(Array.from(originals[source]!));
      const codes = image.warnings.map((w) => w.code);
      expect(codes).not.toContain('lossy_compression');
      expect(codes.includes('no_part10_header')).toBe(name.startsWith('bare'));
    },
  );

  it.each(LOSSY)(
    '%s via %s %j (%s) equals dcmtk’s decompression and warns of loss',
    async (source, tool, args, name, syntax, decompressor) => {
      const file = convert(source, tool, args, name);
      const plain = path.join(dir, `${source}-${name}-plain.dcm`);
      dcmtk(decompressor, [file, plain]);

      const [image, reference] = await Promise.all([
        readDicomFile(file),
        readDicomFile(plain),
      ]);

      expect(image.transferSyntaxUid).toBe(syntax);
      expect(Array.from(image.pixels)).toEqual(Array.from(reference.pixels));
      expect(image.warnings.map((w) => w.code)).toContain('lossy_compression');
      // The loss is real: the phantom's pixels changed (dcmtk +eb/+ee/+en).
      expect(Array.from(image.pixels)).not.toEqual(
        Array.from(originals[source]!),
      );
    },
  );
});
