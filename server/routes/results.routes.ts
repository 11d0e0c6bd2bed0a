import { Router } from 'express';
import { recomputeRequestSchema } from '../../shared/schemas/results.schema.ts';
import { studyIdParamsSchema } from '../../shared/schemas/study.schema.ts';
import { assertOpenForChanges } from '../../shared/studies/study-state.ts';
import { enqueueStudyRecompute } from '../jobs/recompute-study.job.ts';
import {
  authenticate,
  authorize,
  currentUser,
} from '../middleware/authenticate.ts';
import { Grid } from '../models/grid.model.ts';
import { canEditStudy } from '../policies/study.policy.ts';
import {
  presentProgress,
  presentStudyResults,
} from '../presenters/results.presenter.ts';
import { conditionImageSets } from '../services/image-pairing.service.ts';
import { findStudyLayout } from '../services/region-layout.service.ts';
import {
  loadStudyAnalyses,
  recordRecomputeRequest,
  studyAnalysisSettings,
} from '../services/study-results.service.ts';
import { findStudyFor } from '../services/study.service.ts';
import { StudyCondition } from '../models/study-condition.model.ts';

async function progressOf(studyId: number) {
  const [conditions, analyses] = await Promise.all([
    StudyCondition.findAll({ where: { studyId }, attributes: ['id'] }),
    loadStudyAnalyses(studyId),
  ]);
  return presentProgress(
    conditions.map((c) => c.id),
    analyses,
  );
}

/**
 * Study results: every condition's figures with intervals, verdicts and
 * method (`GET /studies/:id/results`), the progress of a recomputation
 * (`…/results/progress`, for polling) and a recomputation on demand.
 */
export function resultsRouter(): Router {
  const router = Router();

  router.get('/studies/:id/results', authenticate, async (req, res) => {
    const viewer = currentUser(req);
    const { id } = studyIdParamsSchema.parse(req.params);
    const study = await findStudyFor(viewer, id);
    const sets = await conditionImageSets(study.id);
    const [grids, analyses, layout, settings] = await Promise.all([
      Grid.findAll({
        where: { id: [...new Set(sets.map((s) => s.condition.gridId))] },
      }),
      loadStudyAnalyses(study.id),
      findStudyLayout(study.id),
      studyAnalysisSettings(study.id),
    ]);
    res.json({
      data: presentStudyResults({
        study,
        viewer,
        sets,
        grids,
        analyses,
        layout,
        settings,
      }),
    });
  });

  router.get(
    '/studies/:id/results/progress',
    authenticate,
    async (req, res) => {
      const { id } = studyIdParamsSchema.parse(req.params);
      const study = await findStudyFor(currentUser(req), id);
      res.json({ data: await progressOf(study.id) });
    },
  );

  router.post(
    '/studies/:id/results/recompute',
    authenticate,
    async (req, res) => {
      const viewer = currentUser(req);
      const { id } = studyIdParamsSchema.parse(req.params);
      const study = await findStudyFor(viewer, id);
      authorize(
        canEditStudy(viewer, study),
        'Your role does not let you recompute this study.',
      );
      assertOpenForChanges(study.status);
      const { settings } = recomputeRequestSchema.parse(req.body);
      await recordRecomputeRequest(study.id, settings, {
        actorId: viewer.id,
        ipAddress: req.ip ?? null,
      });
      const outcome = await enqueueStudyRecompute(study.id, {
        reason: 'requested',
        settings,
      });
      res
        .status(202)
        .json({ data: await progressOf(study.id), meta: { outcome } });
    },
  );

  return router;
}
