import { Router, type Request } from 'express';
import { MAX_BOARD_CONDITIONS } from '../../shared/schemas/compare.schema.ts';
import { studyIdParamsSchema } from '../../shared/schemas/study.schema.ts';
import type { AppConfig } from '../config/env.ts';
import { fromRoot } from '../config/paths.ts';
import { notFound } from '../errors.ts';
import { authenticate, currentUser } from '../middleware/authenticate.ts';
import { Study } from '../models/study.model.ts';
import { canDownloadStudyResults } from '../policies/compare.policy.ts';
import { presentBoardConditions } from '../presenters/compare.presenter.ts';
import { loadBoard } from '../services/compare-board.service.ts';
import { createDiskImageStore } from '../services/image-storage.service.ts';
import { figuresCsv } from '../services/report-csv.service.ts';
import {
  renderStudyReportPdf,
  studyReportData,
} from '../services/report-pdf.service.ts';

/** The study of `:id`, or 404 when it does not exist or is hidden. */
async function visibleStudy(req: Request): Promise<Study> {
  const { id } = studyIdParamsSchema.parse(req.params);
  const study = await Study.findByPk(id);
  // A study the viewer may not see answers 404, as on every study route.
  if (!study || !canDownloadStudyResults(currentUser(req), study)) {
    throw notFound('study');
  }
  return study;
}

/**
 * A study's signed PDF report and its results as CSV. The PDF is refused
 * (409) until the study is signed; the CSV follows the study's visibility
 * and carries its status on every row.
 */
export function reportsRouter(config: AppConfig): Router {
  const router = Router();
  const store = createDiskImageStore(fromRoot(config.uploadsDir));

  router.get('/studies/:id/report.pdf', authenticate, async (req, res) => {
    const study = await visibleStudy(req);
    const data = await studyReportData(study, currentUser(req), store);
    const pdf = await renderStudyReportPdf(data);
    res
      .type('application/pdf')
      .attachment(`lamella-study-${study.id}-revision-${study.revision}.pdf`)
      .send(pdf);
  });

  router.get('/studies/:id/results.csv', authenticate, async (req, res) => {
    const study = await visibleStudy(req);
    const board = await loadBoard(
      { studyId: study.id },
      [study.status],
      MAX_BOARD_CONDITIONS,
    );
    res
      .type('text/csv; charset=utf-8')
      .attachment(`lamella-study-${study.id}-results.csv`)
      .send(figuresCsv(presentBoardConditions(board)));
  });

  return router;
}
