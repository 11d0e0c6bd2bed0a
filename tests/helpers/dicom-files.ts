import { execFileSync } from 'node:child_process';
import { randomUUID } from 'node:crypto';
import {
  mkdirSync,
  readdirSync,
  readFileSync,
  rmSync,
  statSync,
  writeFileSync,
} from 'node:fs';
import path from 'node:path';
import { fromRoot } from '../../server/config/paths.ts';
import { writeDicom } from '../../server/dicom/write-dicom.ts';
import { dcmtk, phantomPixels } from './dicom-phantom.ts';

type Attributes = Record<string, string | number | number[] | string[]>;

/**
 * Acquisition attributes of a typical grid exposure on a DX detector
 * (invented; a 0.25 mm pitch is 40 lines/cm, common practice).
 */
export const GRID_EXPOSURE_ATTRIBUTES: Attributes = {
  KVP: 81,
  ExposureInuAs: 10_000,
  DistanceSourceToDetector: 1800,
  ImagerPixelSpacing: [0.148, 0.148],
  Grid: ['FOCUSED', 'RECIPROCATING'],
  GridPitch: 0.25,
  GridFocalDistance: 1800,
  StationName: 'SGH-DX2',
};

/**
 * A small synthetic DX phantom as DICOM bytes (explicit VR little endian,
 * written with the project's writeDicom). Each call gets a fresh Image
 * Comments value, so its bytes and SOP Instance UID are new even on a test
 * database that keeps earlier runs' images.
 */
export function phantomDicom(
  options: {
    seed?: number;
    rows?: number;
    columns?: number;
    attributes?: Attributes;
  } = {},
): Uint8Array {
  const { seed = 1, rows = 48, columns = 64 } = options;
  return writeDicom({
    rows,
    columns,
    pixels: phantomPixels({ rows, columns, bitsStored: 12, seed }),
    attributes: {
      BitsStored: 12,
      ImageComments: `test ${randomUUID()}`,
      ...GRID_EXPOSURE_ATTRIBUTES,
      ...options.attributes,
    },
  });
}

/** A fresh, empty folder under test-output/ for one test file's files. */
export function scratchDir(name: string): string {
  const dir = fromRoot(`test-output/${name}`);
  rmSync(dir, { recursive: true, force: true });
  mkdirSync(dir, { recursive: true });
  return dir;
}

/** Writes bytes to `dir/name` and returns the path. */
export function writeFile(
  dir: string,
  name: string,
  bytes: Uint8Array | string,
): string {
  const file = path.join(dir, name);
  mkdirSync(path.dirname(file), { recursive: true });
  writeFileSync(file, bytes);
  return file;
}

/**
 * A lossy copy of a DICOM file made by Debian's dcmtk: `dcmcjpeg +ee`
 * (JPEG Extended, 12-bit lossy, transfer syntax 1.2.840.10008.1.2.4.51).
 */
export function lossyJpegCopy(source: string, target: string): string {
  dcmtk('dcmcjpeg', ['+ee', source, target]);
  return target;
}

/**
 * Zips a folder with Python's zipfile (Debian's python3, deflate), keeping
 * the folder's relative paths, folder entries included, as an exported
 * session would be.
 */
export function zipFolder(folder: string, zipPath: string): string {
  const script = [
    'import os, sys, zipfile',
    'src, out = sys.argv[1], sys.argv[2]',
    'with zipfile.ZipFile(out, "w", zipfile.ZIP_DEFLATED) as z:',
    '    for root, dirs, files in os.walk(src):',
    '        for d in sorted(dirs):',
    '            z.write(os.path.join(root, d), os.path.relpath(os.path.join(root, d), src))',
    '        for f in sorted(files):',
    '            z.write(os.path.join(root, f), os.path.relpath(os.path.join(root, f), src))',
  ].join('\n');
  execFileSync('/usr/bin/python3', ['-c', script, folder, zipPath]);
  return zipPath;
}

/** Every file under a folder (recursively), as paths relative to it. */
export function filesUnder(dir: string): string[] {
  let entries: string[];
  try {
    entries = readdirSync(dir);
  } catch {
    return [];
  }
  return entries.flatMap((entry) => {
    const full = path.join(dir, entry);
    return statSync(full).isDirectory()
      ? filesUnder(full).map((f) => path.join(entry, f))
      : [entry];
  });
}

/** The bytes of a file, for comparing stored files with what was sent. */
export const bytesOf = (file: string): Buffer => readFileSync(file);
