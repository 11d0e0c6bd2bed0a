import { Router, type Request } from 'express';
import passport from 'passport';
import {
  changePasswordSchema,
  completeTokenSchema,
  requestResetSchema,
  signInSchema,
  type SessionDto,
} from '../../shared/schemas/auth.schema.ts';
import { z } from 'zod';
import type { AppConfig } from '../config/env.ts';
import { AppError } from '../errors.ts';
import type { Mailer } from '../mail/mailer.ts';
import { authenticate, currentUser } from '../middleware/authenticate.ts';
import { signInLimits } from '../middleware/sign-in-limits.ts';
import { sessionCapabilities } from '../policies/account.policy.ts';
import { presentUser } from '../presenters/user.presenter.ts';
import { recordAudit } from '../services/audit.service.ts';
import {
  changeOwnPassword,
  completeToken,
  describeToken,
  findUserById,
  requestPasswordReset,
} from '../services/user.service.ts';

const tokenParamsSchema = z.object({ token: z.string().min(20).max(200) });

const ipOf = (req: Request): string | null => req.ip ?? null;

async function sessionOf(user: Express.User): Promise<SessionDto> {
  const record = await findUserById(user.id);
  return { user: presentUser(record, user), can: sessionCapabilities(user) };
}

function logIn(req: Request, user: Express.User): Promise<void> {
  return new Promise((resolve, reject) =>
    req.logIn(user, (error) => (error ? reject(error) : resolve())),
  );
}

function authenticateLocal(req: Request): Promise<Express.User | false> {
  return new Promise((resolve, reject) => {
    passport.authenticate(
      'local',
      { session: false },
      (error: unknown, user: Express.User | false) =>
        error ? reject(error) : resolve(user),
    )(req, undefined, undefined);
  });
}

/** Sign-in, sign-out, the current session, password reset and invitations. */
export function authRouter(config: AppConfig, mailer: Mailer): Router {
  const router = Router();
  const deps = { mailer, publicUrl: config.publicUrl };

  router.post('/sign-in', ...signInLimits(config), async (req, res) => {
    req.body = signInSchema.parse(req.body);
    const user = await authenticateLocal(req);
    if (!user) {
      await recordAudit(
        { actorId: null, ipAddress: ipOf(req) },
        {
          action: 'session.sign_in_failed',
          targetType: 'session',
          details: { email: req.body.email },
        },
      );
      throw new AppError(
        401,
        'unauthenticated',
        'The e-mail address or password is not right.',
      );
    }
    // passport regenerates the session id here, so a planted id is useless.
    await logIn(req, user);
    await recordAudit(
      { actorId: user.id, ipAddress: ipOf(req) },
      { action: 'session.signed_in', targetType: 'user', targetId: user.id },
    );
    res.json({ data: await sessionOf(user) });
  });

  router.post('/sign-out', async (req, res) => {
    const user = req.user;
    await new Promise<void>((resolve, reject) =>
      req.logOut((error) => (error ? reject(error) : resolve())),
    );
    await new Promise<void>((resolve) => req.session.destroy(() => resolve()));
    if (user) {
      await recordAudit(
        { actorId: user.id, ipAddress: ipOf(req) },
        { action: 'session.signed_out', targetType: 'user', targetId: user.id },
      );
    }
    res.clearCookie('lamella.sid');
    res.status(204).end();
  });

  router.get('/me', authenticate, async (req, res) => {
    res.json({ data: await sessionOf(currentUser(req)) });
  });

  router.post('/password', authenticate, async (req, res) => {
    const input = changePasswordSchema.parse(req.body);
    const actor = currentUser(req);
    await changeOwnPassword(
      await findUserById(actor.id),
      input.currentPassword,
      input.newPassword,
      {
        actorId: actor.id,
        ipAddress: ipOf(req),
      },
    );
    res.status(204).end();
  });

  router.post('/password-reset', async (req, res) => {
    const { email } = requestResetSchema.parse(req.body);
    await requestPasswordReset(email, { ipAddress: ipOf(req) }, deps);
    res.status(202).json({
      data: {
        message:
          'If this address belongs to an account, a reset link is on its way.',
      },
    });
  });

  router.get('/tokens/:token', async (req, res) => {
    const { token } = tokenParamsSchema.parse(req.params);
    res.json({ data: await describeToken(token) });
  });

  router.post('/password-reset/complete', async (req, res) => {
    const input = completeTokenSchema.parse(req.body);
    await completeToken(input, 'password_reset', { ipAddress: ipOf(req) });
    res.status(204).end();
  });

  router.post('/invitation/complete', async (req, res) => {
    const input = completeTokenSchema.parse(req.body);
    await completeToken(input, 'invitation', { ipAddress: ipOf(req) });
    res.status(204).end();
  });

  return router;
}
