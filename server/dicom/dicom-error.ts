import type { ErrorCode } from '../../shared/errors.ts';
import { DomainError } from '../../shared/errors.ts';

/** Codes a DICOM file can be rejected with (a subset of shared ErrorCode). */
export type DicomErrorCode = Extract<
  ErrorCode,
  | 'not_dicom'
  | 'malformed_dicom'
  | 'truncated_dicom'
  | 'unsupported_transfer_syntax'
  | 'unsupported_dicom'
  | 'colour_image'
  | 'pixel_data_missing'
  | 'pixel_data_length_mismatch'
  | 'frame_out_of_range'
  | 'file_unreadable'
>;

/** A DICOM file that cannot be decoded or measured, with a stable code. */
export class DicomError extends DomainError {
  declare readonly code: DicomErrorCode;

  constructor(code: DicomErrorCode, message: string) {
    super(code, message);
    this.name = 'DicomError';
  }
}
