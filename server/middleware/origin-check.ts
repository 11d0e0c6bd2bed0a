import type { NextFunction, Request, Response } from 'express';
import { AppError } from '../errors.ts';

const SAFE_METHODS = new Set(['GET', 'HEAD', 'OPTIONS']);

/**
 * CSRF defence for the cookie session: a state-changing request must say
 * where it comes from (Origin, or Referer when a browser omits Origin), and
 * that must be this server or the configured public URL.
 */
export function originCheck(publicUrl: string) {
  const allowed = new URL(publicUrl).origin;
  return (req: Request, _res: Response, next: NextFunction): void => {
    if (SAFE_METHODS.has(req.method)) return next();
    const declared = req.get('origin') ?? originOf(req.get('referer'));
    const own = `${req.protocol}://${req.get('host') ?? ''}`;
    if (declared && (declared === allowed || declared === own)) return next();
    next(
      new AppError(
        403,
        'csrf_rejected',
        declared
          ? `Requests from ${declared} are not accepted.`
          : 'The request does not say where it comes from (no Origin header).',
      ),
    );
  };
}

function originOf(url: string | undefined): string | undefined {
  if (!url) return undefined;
  try {
    return new URL(url).origin;
  } catch {
    return undefined;
  }
}
