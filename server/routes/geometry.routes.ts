import { Router, type Request } from 'express';
import {
  gridPredictionQuerySchema,
  type StudyPredictionsDto,
  planRequestSchema,
  studyPredictionsQuerySchema,
  transmissionRequestSchema,
} from '../../shared/schemas/geometry-api.schema.ts';
import { idParamsSchema } from '../../shared/schemas/equipment.schema.ts';
import { studyIdParamsSchema } from '../../shared/schemas/study.schema.ts';
import { authorize, currentUser } from '../middleware/authenticate.ts';
import { canViewEquipment } from '../policies/equipment.policy.ts';
import {
  planGeometry,
  predictTransmission,
} from '../services/geometry.service.ts';
import {
  predictForGrid,
  predictStudyConditions,
} from '../services/grid-prediction.service.ts';
import { findGridById } from '../services/grid.service.ts';
import { findStudyFor } from '../services/study.service.ts';

/** The signed-in reader of the register; every role may read it. */
function registerReader(req: Request): Express.User {
  const viewer = currentUser(req);
  authorize(canViewEquipment(viewer));
  return viewer;
}

/**
 * The focused-grid planner and predicted transmissions. Both are
 * calculators that write nothing, so every signed-in role may use them
 * (admin, physicist, resident, committee); a register grid is read under
 * the register's own rule (every role reads it), and a study's predictions
 * under the study's (committee members see signed studies only, others 404).
 */
export function geometryRouter(): Router {
  const router = Router();

  router.post('/plan', async (req, res) => {
    const request = planRequestSchema.parse(req.body);
    if (request.gridId !== undefined) registerReader(req);
    res.json({ data: await planGeometry(request) });
  });

  router.post('/transmission', async (req, res) => {
    const request = transmissionRequestSchema.parse(req.body);
    if (request.gridId !== undefined) registerReader(req);
    res.json({ data: await predictTransmission(request) });
  });

  router.get('/grids/:id/prediction', async (req, res) => {
    registerReader(req);
    const { id } = idParamsSchema.parse(req.params);
    const query = gridPredictionQuerySchema.parse(req.query);
    const grid = await findGridById(id);
    res.json({
      data: predictForGrid({
        grid,
        kvp: query.kvp,
        totalFiltrationMmAl: query.filtrationMmAl,
        scatterToPrimaryRatio: query.spr,
      }),
    });
  });

  router.get('/studies/:id/predictions', async (req, res) => {
    const { id } = studyIdParamsSchema.parse(req.params);
    const study = await findStudyFor(currentUser(req), id);
    const { spr } = studyPredictionsQuerySchema.parse(req.query);
    const data: StudyPredictionsDto = {
      scatterToPrimaryRatio: spr,
      conditions: await predictStudyConditions(study, spr),
    };
    res.json({ data });
  });

  return router;
}
