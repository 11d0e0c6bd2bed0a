import { Router } from 'express';
import { z } from 'zod';
import { requireRole } from '../middleware/authenticate.ts';
import { presentSentMail } from '../presenters/sent-mail.presenter.ts';
import { listSentMail } from '../services/sent-mail.service.ts';

const listQuerySchema = z.object({
  to: z.string().max(254).optional(),
  limit: z.coerce.number().int().min(1).max(500).default(100),
});

/** The sent-mail view: what Lamella's fake SMTP server received. */
export function mailRouter(): Router {
  const router = Router();
  router.use(requireRole('admin'));
  router.get('/', async (req, res) => {
    const query = listQuerySchema.parse(req.query);
    res.json({ data: (await listSentMail(query)).map(presentSentMail) });
  });
  return router;
}
