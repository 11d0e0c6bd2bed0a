import { Router } from 'express';
import type { AppDeps } from '../app.ts';
import { AppError } from '../errors.ts';
import { authenticate } from '../middleware/authenticate.ts';
import { authRouter } from './auth.routes.ts';
import { compareRouter } from './compare.routes.ts';
import { equipmentRouter } from './equipment.routes.ts';
import { geometryRouter } from './geometry.routes.ts';
import { imagesRouter } from './images.routes.ts';
import { layoutsRouter } from './layouts.routes.ts';
import { mailRouter } from './mail.routes.ts';
import { reportsRouter } from './reports.routes.ts';
import { resultsRouter } from './results.routes.ts';
import { studiesRouter } from './studies.routes.ts';
import { usersRouter } from './users.routes.ts';

/** Every API router, mounted under /api. */
export function apiRouter(deps: AppDeps): Router {
  const router = Router();
  router.get('/health', (_req, res) => {
    res.json({ data: { status: 'ok' } });
  });
  router.use('/auth', authRouter(deps.config, deps.mailer));
  router.use('/users', authenticate, usersRouter(deps.config, deps.mailer));
  router.use('/mail', authenticate, mailRouter());
  router.use(reportsRouter(deps.config));
  router.use(compareRouter());
  router.use('/studies', authenticate, studiesRouter(deps));
  router.use('/equipment', authenticate, equipmentRouter());
  router.use('/geometry', authenticate, geometryRouter());
  router.use('/images', authenticate, imagesRouter(deps.config));
  router.use(layoutsRouter(deps.config));
  router.use(resultsRouter());
  router.use((req) => {
    throw new AppError(
      404,
      'not_found',
      `No API route ${req.method} ${req.path}.`,
    );
  });
  return router;
}
