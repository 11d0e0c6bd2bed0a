/**
 * Transfer syntaxes Lamella decodes, by UID (DICOM PS3.5 §10 and PS3.6
 * Annex A), with a plain name and whether the syntax permits loss.
 */
export const TRANSFER_SYNTAXES = {
  '1.2.840.10008.1.2': { name: 'Implicit VR Little Endian', lossy: false },
  '1.2.840.10008.1.2.1': { name: 'Explicit VR Little Endian', lossy: false },
  '1.2.840.10008.1.2.1.99': {
    name: 'Deflated Explicit VR Little Endian',
    lossy: false,
  },
  '1.2.840.10008.1.2.2': { name: 'Explicit VR Big Endian', lossy: false },
  '1.2.840.10008.1.2.5': { name: 'RLE Lossless', lossy: false },
  '1.2.840.10008.1.2.4.50': { name: 'JPEG Baseline (8-bit)', lossy: true },
  '1.2.840.10008.1.2.4.51': { name: 'JPEG Extended (12-bit)', lossy: true },
  '1.2.840.10008.1.2.4.57': {
    name: 'JPEG Lossless, Process 14',
    lossy: false,
  },
  '1.2.840.10008.1.2.4.70': {
    name: 'JPEG Lossless, Process 14, Selection Value 1',
    lossy: false,
  },
  '1.2.840.10008.1.2.4.80': { name: 'JPEG-LS Lossless', lossy: false },
  '1.2.840.10008.1.2.4.81': {
    name: 'JPEG-LS Near-Lossless',
    lossy: true,
  },
  '1.2.840.10008.1.2.4.90': {
    name: 'JPEG 2000 (Lossless Only)',
    lossy: false,
  },
  '1.2.840.10008.1.2.4.91': { name: 'JPEG 2000', lossy: true },
} as const;

export type TransferSyntaxUid = keyof typeof TRANSFER_SYNTAXES;

export const IMPLICIT_VR_LITTLE_ENDIAN = '1.2.840.10008.1.2';
export const EXPLICIT_VR_LITTLE_ENDIAN = '1.2.840.10008.1.2.1';
export const DEFLATED_EXPLICIT_VR_LITTLE_ENDIAN = '1.2.840.10008.1.2.1.99';
export const EXPLICIT_VR_BIG_ENDIAN = '1.2.840.10008.1.2.2';
export const RLE_LOSSLESS = '1.2.840.10008.1.2.5';
export const JPEG_BASELINE = '1.2.840.10008.1.2.4.50';
export const JPEG_EXTENDED = '1.2.840.10008.1.2.4.51';
export const JPEG_LOSSLESS = '1.2.840.10008.1.2.4.57';
export const JPEG_LOSSLESS_SV1 = '1.2.840.10008.1.2.4.70';
export const JPEG_LS_LOSSLESS = '1.2.840.10008.1.2.4.80';
export const JPEG_LS_NEAR_LOSSLESS = '1.2.840.10008.1.2.4.81';
export const JPEG_2000_LOSSLESS = '1.2.840.10008.1.2.4.90';
export const JPEG_2000 = '1.2.840.10008.1.2.4.91';

/** True for a transfer syntax listed in {@link TRANSFER_SYNTAXES}. */
export function isKnownTransferSyntax(uid: string): uid is TransferSyntaxUid {
  return Object.hasOwn(TRANSFER_SYNTAXES, uid);
}

/** A readable name for a transfer syntax UID, or the UID itself. */
export function transferSyntaxName(uid: string): string {
  return isKnownTransferSyntax(uid) ? TRANSFER_SYNTAXES[uid].name : uid;
}
