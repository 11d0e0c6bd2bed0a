import { Router } from 'express';
import {
  inviteUserSchema,
  updateUserSchema,
  userIdParamsSchema,
} from '../../shared/schemas/auth.schema.ts';
import type { AppConfig } from '../config/env.ts';
import type { Mailer } from '../mail/mailer.ts';
import {
  authorize,
  currentUser,
  requireRole,
} from '../middleware/authenticate.ts';
import { canEditUser } from '../policies/account.policy.ts';
import { presentUser } from '../presenters/user.presenter.ts';
import { listAuditFor } from '../services/audit.service.ts';
import {
  findUserById,
  inviteUser,
  listUsers,
  updateUser,
} from '../services/user.service.ts';

/** The admin's user register: list, invite, change role, disable. */
export function usersRouter(config: AppConfig, mailer: Mailer): Router {
  const router = Router();
  router.use(requireRole('admin'));

  router.get('/', async (req, res) => {
    const viewer = currentUser(req);
    res.json({ data: (await listUsers()).map((u) => presentUser(u, viewer)) });
  });

  router.post('/', async (req, res) => {
    const input = inviteUserSchema.parse(req.body);
    const viewer = currentUser(req);
    const { user, mailDelivered } = await inviteUser(
      input,
      { actorId: viewer.id, ipAddress: req.ip ?? null },
      { mailer, publicUrl: config.publicUrl },
    );
    res
      .status(201)
      .json({ data: presentUser(user, viewer), meta: { mailDelivered } });
  });

  router.patch('/:id', async (req, res) => {
    const { id } = userIdParamsSchema.parse(req.params);
    const input = updateUserSchema.parse(req.body);
    const viewer = currentUser(req);
    const user = await findUserById(id);
    authorize(
      canEditUser(viewer, user),
      'You cannot change your own account here.',
    );
    const updated = await updateUser(user, input, {
      actorId: viewer.id,
      ipAddress: req.ip ?? null,
    });
    res.json({ data: presentUser(updated, viewer) });
  });

  router.get('/:id/audit', async (req, res) => {
    const { id } = userIdParamsSchema.parse(req.params);
    await findUserById(id);
    const events = await listAuditFor('user', id);
    res.json({
      data: events.map((e) => ({
        id: Number(e.id),
        action: e.action,
        actorId: e.actorId,
        details: e.details,
        ipAddress: e.ipAddress,
        at: e.createdAt.toISOString(),
      })),
    });
  });

  return router;
}
