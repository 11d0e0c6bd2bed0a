import type { RequestHandler } from 'express';
import { rateLimit } from 'express-rate-limit';
import type { AppConfig } from '../config/env.ts';
import type { ErrorBody } from '../../shared/errors.ts';

const tooMany: ErrorBody = {
  error: {
    code: 'rate_limited',
    message:
      'Too many failed sign-in attempts. Wait a few minutes and try again.',
  },
};

const accountKey = (body: unknown): string => {
  const email = (body as { email?: unknown } | undefined)?.email;
  return typeof email === 'string' ? email.trim().toLowerCase() : '(none)';
};

/**
 * Failed sign-ins are limited per address and per account, so neither one
 * machine nor many machines can keep guessing one password.
 */
export function signInLimits(config: AppConfig): RequestHandler[] {
  const common = {
    windowMs: config.signInWindowMs,
    skipSuccessfulRequests: true,
    standardHeaders: 'draft-8' as const,
    legacyHeaders: false,
    message: tooMany,
  };
  return [
    rateLimit({ ...common, limit: config.signInLimitPerAddress }),
    rateLimit({
      ...common,
      limit: config.signInLimitPerAccount,
      keyGenerator: (req) => `account:${accountKey(req.body)}`,
    }),
  ];
}
