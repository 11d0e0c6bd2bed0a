/**
 * Stable, snake_case error codes shared by API responses, the command line
 * and the client. Every error body is `{ error: { code, message, details? } }`.
 */
export const ERROR_CODES = [
  'validation_failed',
  'unauthenticated',
  'forbidden',
  'not_found',
  'conflict',
  'rate_limited',
  'payload_too_large',
  'csrf_rejected',
  'token_invalid',
  'token_expired',
  'account_disabled',
  'study_locked',
  'invalid_state_transition',
  'unsupported_dicom',
  'malformed_dicom',
  'truncated_dicom',
  'not_dicom',
  'unsupported_transfer_syntax',
  'colour_image',
  'pixel_data_missing',
  'pixel_data_length_mismatch',
  'frame_out_of_range',
  'region_empty',
  'region_invalid',
  'analysis_failed',
  'usage',
  'file_unreadable',
  'internal_error',
] as const;

export type ErrorCode = (typeof ERROR_CODES)[number];

/** One field-level problem, as reported under `error.details`. */
export interface ErrorDetail {
  path: string;
  message: string;
}

/** The JSON body of every error response. */
export interface ErrorBody {
  error: { code: ErrorCode; message: string; details?: ErrorDetail[] };
}

/**
 * A domain error with a stable code, thrown by pure code in `shared/` and by
 * services; the server's error handler and the CLI translate it.
 */
export class DomainError extends Error {
  readonly code: ErrorCode;

  constructor(code: ErrorCode, message: string) {
    super(message);
    this.name = 'DomainError';
    this.code = code;
  }
}
