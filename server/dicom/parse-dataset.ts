import { inflateRawSync } from 'node:zlib';
import type { DataSet } from 'dicom-parser';
import dicomParser from 'dicom-parser';
import {
  DEFLATED_EXPLICIT_VR_LITTLE_ENDIAN,
  EXPLICIT_VR_BIG_ENDIAN,
  EXPLICIT_VR_LITTLE_ENDIAN,
  IMPLICIT_VR_LITTLE_ENDIAN,
} from '../../shared/dicom/transfer-syntaxes.ts';
import type { Warning } from '../../shared/warnings.ts';
import { DicomError } from './dicom-error.ts';
import { vrOfTag } from './dicom-dictionary.ts';

/** A parsed dataset with its transfer syntax and how it was found. */
export interface ParsedDataset {
  dataSet: DataSet;
  transferSyntaxUid: string;
  warnings: Warning[];
}

/** Largest inflated size accepted for a deflated dataset (zip-bomb guard). */
const MAX_INFLATED_BYTES = 2 ** 31 - 1;

const VALID_VRS = new Set(
  'AE AS AT CS DA DS DT FD FL IS LO LT OB OD OF OL OV OW PN SH SL SQ SS ST SV TM UC UI UL UN UR US UT UV'.split(
    ' ',
  ),
);

const u16le = (b: Uint8Array, p: number): number => b[p]! | (b[p + 1]! << 8);
const u16be = (b: Uint8Array, p: number): number => (b[p]! << 8) | b[p + 1]!;
const u32le = (b: Uint8Array, p: number): number =>
  (b[p]! | (b[p + 1]! << 8) | (b[p + 2]! << 16) | (b[p + 3]! << 24)) >>> 0;

function hasVr(bytes: Uint8Array, position: number): boolean {
  return VALID_VRS.has(
    String.fromCharCode(bytes[position + 4]!, bytes[position + 5]!),
  );
}

/**
 * Guesses how a dataset without a usable meta header is encoded from its
 * first element: a VR after the tag means explicit VR, and a tag whose group
 * reads small in big-endian order means big endian; otherwise implicit VR
 * little endian if the group and length are plausible.
 */
function detectEncoding(bytes: Uint8Array, position: number): string | null {
  if (bytes.length - position < 8) return null;
  if (hasVr(bytes, position)) {
    const le = u16le(bytes, position);
    const be = u16be(bytes, position);
    if (be < le && be >= 0x0002 && be <= 0x7fe0) return EXPLICIT_VR_BIG_ENDIAN;
    return le >= 0x0002 && le <= 0x7fe0 ? EXPLICIT_VR_LITTLE_ENDIAN : null;
  }
  const group = u16le(bytes, position);
  const length = u32le(bytes, position + 4);
  const plausibleLength =
    length === 0xffffffff || length <= bytes.length - position - 8;
  return group >= 0x0002 &&
    group <= 0x7fe0 &&
    group % 2 === 0 &&
    plausibleLength
    ? IMPLICIT_VR_LITTLE_ENDIAN
    : null;
}

/**
 * Walks a File Meta group (explicit VR little endian) from `position` and
 * returns where it ends and its Transfer Syntax UID, reading every length
 * with a bounds check.
 */
function scanMetaGroup(
  bytes: Uint8Array,
  position: number,
): { end: number; transferSyntaxUid: string | null } {
  let p = position;
  let transferSyntaxUid: string | null = null;
  while (p + 8 <= bytes.length && u16le(bytes, p) === 0x0002) {
    const element = u16le(bytes, p + 2);
    const vr = String.fromCharCode(bytes[p + 4]!, bytes[p + 5]!);
    let length: number;
    let header: number;
    if (['OB', 'OW', 'OF', 'SQ', 'UT', 'UN'].includes(vr)) {
      if (p + 12 > bytes.length) break;
      length = u32le(bytes, p + 8);
      header = 12;
    } else {
      length = u16le(bytes, p + 6);
      header = 8;
    }
    if (p + header + length > bytes.length) {
      throw new DicomError(
        'truncated_dicom',
        'The file ends inside its meta header.',
      );
    }
    if (element === 0x0010) {
      transferSyntaxUid = new TextDecoder('latin1')
        .decode(bytes.subarray(p + header, p + header + length))
        .replace(/[\0 ]+$/, '');
    }
    p += header + length;
  }
  return { end: p, transferSyntaxUid };
}

function inflater(bytes: Uint8Array, position: number): Uint8Array {
  let inflated: Buffer;
  try {
    inflated = inflateRawSync(bytes.subarray(position), {
      maxOutputLength: MAX_INFLATED_BYTES,
    });
  } catch (error) {
    throw new DicomError(
      'malformed_dicom',
      `The deflated dataset does not inflate: ${(error as Error).message}.`,
    );
  }
  const whole = new Uint8Array(position + inflated.length);
  whole.set(bytes.subarray(0, position));
  whole.set(inflated, position);
  return whole;
}

/** Turns whatever dicom-parser threw (often a string or a plain object) into a DicomError. */
function translateParserError(thrown: unknown): DicomError {
  if (thrown instanceof DicomError) return thrown;
  const inner =
    typeof thrown === 'object' && thrown !== null && 'exception' in thrown
      ? (thrown as { exception: unknown }).exception
      : thrown;
  if (inner instanceof DicomError) return inner;
  const text =
    inner instanceof Error
      ? inner.message
      : typeof inner === 'string'
        ? inner
        : String(inner);
  if (
    /overrun|overread|past end|end of buffer|eof|cannot seek|greater than or equal|maxPosition/i.test(
      text,
    )
  ) {
    return new DicomError(
      'truncated_dicom',
      'The file ends before the data its headers announce.',
    );
  }
  return new DicomError(
    'malformed_dicom',
    `The file's structure is not valid DICOM (${text.replace(/^dicomParser[.:]\w*[.:]?\s*/i, '')}).`,
  );
}

function parseWith(bytes: Uint8Array, transferSyntaxUid?: string): DataSet {
  try {
    return dicomParser.parseDicom(bytes, {
      TransferSyntaxUID: transferSyntaxUid,
      inflater: inflater as unknown as (
        arr: Uint8Array,
        position: number,
      ) => void,
      vrCallback: vrOfTag as unknown as (tag: string) => void,
    });
  } catch (thrown) {
    throw translateParserError(thrown);
  }
}

const DICM = [0x44, 0x49, 0x43, 0x4d];

function hasPreamble(bytes: Uint8Array): boolean {
  return bytes.length >= 132 && DICM.every((c, i) => bytes[128 + i] === c);
}

/**
 * Parses DICOM bytes: a Part 10 file, a meta group without the 128-byte
 * preamble, or a bare dataset (implicit or explicit VR, either byte order)
 * without any meta header, each of the last two with a warning.
 *
 * @throws DicomError('not_dicom') when the bytes are not DICOM at all;
 *   'truncated_dicom' or 'malformed_dicom' when the structure breaks.
 */
export function parseDataset(bytes: Uint8Array): ParsedDataset {
  const warnings: Warning[] = [];
  let metaStart: number | null = null;
  if (hasPreamble(bytes)) metaStart = 132;
  else if (bytes.length >= 8 && u16le(bytes, 0) === 0x0002 && hasVr(bytes, 0)) {
    metaStart = 0;
    warnings.push({
      code: 'no_part10_header',
      message:
        'The file lacks the 128-byte preamble and DICM prefix of a DICOM Part 10 file; it was read from its meta header.',
    });
  }
  if (metaStart === null) {
    const detected = detectEncoding(bytes, 0);
    if (!detected) {
      throw new DicomError(
        'not_dicom',
        'This is not a DICOM file: it has no DICM prefix and does not start with a DICOM element.',
      );
    }
    warnings.push({
      code: 'no_part10_header',
      message: `The file is a bare DICOM dataset without the Part 10 preamble and meta header; it was read as ${detected === IMPLICIT_VR_LITTLE_ENDIAN ? 'implicit VR little endian' : detected === EXPLICIT_VR_BIG_ENDIAN ? 'explicit VR big endian' : 'explicit VR little endian'}.`,
    });
    return {
      dataSet: parseWith(bytes, detected),
      transferSyntaxUid: detected,
      warnings,
    };
  }
  const meta = scanMetaGroup(bytes, metaStart);
  if (meta.transferSyntaxUid && metaStart === 132) {
    const dataSet = parseWith(bytes);
    return { dataSet, transferSyntaxUid: meta.transferSyntaxUid, warnings };
  }
  const detected = meta.transferSyntaxUid ?? detectEncoding(bytes, meta.end);
  if (!detected) {
    throw new DicomError(
      'malformed_dicom',
      'The meta header names no transfer syntax and the dataset after it does not start with a DICOM element.',
    );
  }
  if (!meta.transferSyntaxUid) {
    warnings.push({
      code: 'transfer_syntax_missing',
      message: `The meta header names no transfer syntax; the dataset was read as ${detected === IMPLICIT_VR_LITTLE_ENDIAN ? 'implicit VR little endian' : 'explicit VR'} from its first element.`,
    });
  }
  // Parse the dataset on its own; its meta group is not needed further.
  const rest = bytes.subarray(meta.end);
  const dataSet =
    detected === DEFLATED_EXPLICIT_VR_LITTLE_ENDIAN
      ? parseWith(inflater(rest, 0), EXPLICIT_VR_LITTLE_ENDIAN)
      : parseWith(rest, detected);
  return { dataSet, transferSyntaxUid: detected, warnings };
}
