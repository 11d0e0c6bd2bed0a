import type { NextFunction, Request, Response } from 'express';
import { MulterError } from 'multer';
import { UniqueConstraintError, ValidationError } from 'sequelize';
import { ZodError } from 'zod';
import { DomainError, type ErrorBody } from '../../shared/errors.ts';
import { AppError } from '../errors.ts';

const DOMAIN_STATUS: Partial<Record<DomainError['code'], number>> = {
  not_found: 404,
  conflict: 409,
  study_locked: 409,
  invalid_state_transition: 409,
  validation_failed: 400,
  region_invalid: 400,
  region_empty: 422,
  analysis_failed: 422,
};

function toAppError(error: unknown): AppError | null {
  if (error instanceof AppError) return error;
  if (error instanceof ZodError) {
    return new AppError(
      400,
      'validation_failed',
      'Some fields are not valid.',
      error.issues.map((i) => ({
        path: i.path.join('.') || '(body)',
        message: i.message,
      })),
    );
  }
  if (error instanceof DomainError) {
    return new AppError(
      DOMAIN_STATUS[error.code] ?? 422,
      error.code,
      error.message,
    );
  }
  if (error instanceof UniqueConstraintError) {
    return new AppError(409, 'conflict', 'This already exists.');
  }
  if (error instanceof ValidationError) {
    return new AppError(
      400,
      'validation_failed',
      'Some fields are not valid.',
      error.errors.map((e) => ({ path: e.path ?? '', message: e.message })),
    );
  }
  if (error instanceof MulterError) {
    return error.code === 'LIMIT_FILE_SIZE' || error.code === 'LIMIT_FILE_COUNT'
      ? new AppError(413, 'payload_too_large', error.message)
      : new AppError(400, 'validation_failed', error.message);
  }
  const status = (error as { status?: number; type?: string }).status;
  const type = (error as { type?: string }).type;
  if (type === 'entity.parse.failed') {
    return new AppError(
      400,
      'validation_failed',
      'The request body is not valid JSON.',
    );
  }
  if (type === 'entity.too.large' || status === 413) {
    return new AppError(
      413,
      'payload_too_large',
      'The request body is too large.',
    );
  }
  return null;
}

/** The last middleware: one error shape, no stack traces or SQL sent out. */
export function errorHandler(
  error: unknown,
  req: Request,
  res: Response,
  _next: NextFunction,
): void {
  const known = toAppError(error);
  if (!known) console.error(`[${req.method} ${req.originalUrl}]`, error);
  const app =
    known ??
    new AppError(500, 'internal_error', 'Something went wrong on the server.');
  const body: ErrorBody = {
    error: {
      code: app.code,
      message: app.message,
      ...(app.details ? { details: app.details } : {}),
    },
  };
  res.status(app.status).json(body);
}
