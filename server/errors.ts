import type { ErrorCode, ErrorDetail } from '../shared/errors.ts';

/** The application's one HTTP-aware error type; see error-handler.ts. */
export class AppError extends Error {
  readonly status: number;
  readonly code: ErrorCode;
  readonly details?: ErrorDetail[];

  constructor(
    status: number,
    code: ErrorCode,
    message: string,
    details?: ErrorDetail[],
  ) {
    super(message);
    this.name = 'AppError';
    this.status = status;
    this.code = code;
    this.details = details;
  }
}

export const notFound = (what: string): AppError =>
  new AppError(404, 'not_found', `No such ${what}.`);
export const forbidden = (
  message = 'Your role does not allow this.',
): AppError => new AppError(403, 'forbidden', message);
export const unauthenticated = (): AppError =>
  new AppError(401, 'unauthenticated', 'Sign in first.');
export const conflict = (message: string): AppError =>
  new AppError(409, 'conflict', message);
export const validationFailed = (
  details: ErrorDetail[],
  message = 'Some fields are not valid.',
): AppError => new AppError(400, 'validation_failed', message, details);
export const payloadTooLarge = (message: string): AppError =>
  new AppError(413, 'payload_too_large', message);
