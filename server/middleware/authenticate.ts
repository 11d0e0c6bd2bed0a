import type { NextFunction, Request, Response } from 'express';
import type { Role } from '../../shared/permissions.ts';
import { forbidden, unauthenticated } from '../errors.ts';

/** Answers 401 when no one is signed in. */
export function authenticate(
  req: Request,
  _res: Response,
  next: NextFunction,
): void {
  next(req.user ? undefined : unauthenticated());
}

/** A coarse gate on a router: 401 without a session, 403 for other roles. */
export function requireRole(...roles: Role[]) {
  return (req: Request, _res: Response, next: NextFunction): void => {
    if (!req.user) return next(unauthenticated());
    next(roles.includes(req.user.role) ? undefined : forbidden());
  };
}

/** The signed-in user; only call behind `authenticate`. */
export function currentUser(req: Request): Express.User {
  if (!req.user) throw unauthenticated();
  return req.user;
}

/** Throws 403 unless the policy allowed the action. */
export function authorize(allowed: boolean, message?: string): void {
  if (!allowed) throw forbidden(message);
}
