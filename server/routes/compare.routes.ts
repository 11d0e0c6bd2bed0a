import { Router, type Request } from 'express';
import {
  baselineIdParamsSchema,
  compareQuerySchema,
  createBaselineSchema,
  listBaselinesQuerySchema,
  MAX_BOARD_CONDITIONS,
  roomIdParamsSchema,
  trendQuerySchema,
  updateBaselineSchema,
  type CompareQuery,
} from '../../shared/schemas/compare.schema.ts';
import {
  authenticate,
  authorize,
  currentUser,
} from '../middleware/authenticate.ts';
import {
  boardStatuses,
  canIncludeUnsignedStudies,
  canManageBaselines,
} from '../policies/compare.policy.ts';
import {
  boardCharts,
  comparePermissions,
  gridComparisons,
  presentBaseline,
  presentBoardConditions,
  presentCompareBoard,
  scopeOf,
  verdictSummary,
} from '../presenters/compare.presenter.ts';
import {
  createBaseline,
  deleteBaseline,
  describeBaselines,
  describeBaselinesByIds,
  findBaselineById,
  listBaselines,
  updateBaseline,
} from '../services/baseline.service.ts';
import { loadBoard } from '../services/compare-board.service.ts';
import {
  boardOptions,
  describeBoardFilters,
} from '../services/compare-options.service.ts';
import { figuresCsv } from '../services/report-csv.service.ts';
import { renderBoardReportPdf } from '../services/report-pdf.service.ts';
import {
  DEFAULT_TREND_FIGURES,
  roomSummaries,
  roomTrend,
} from '../services/trend.service.ts';

const auditOf = (req: Request) => ({
  actorId: currentUser(req).id,
  ipAddress: req.ip ?? null,
});

/** Parses the board query and checks the viewer may have the scope asked. */
function boardRequest(req: Request): {
  query: CompareQuery;
  statuses: ReturnType<typeof boardStatuses>;
} {
  const query = compareQuerySchema.parse(req.query);
  const viewer = currentUser(req);
  if (query.drafts) {
    authorize(
      canIncludeUnsignedStudies(viewer),
      'Only physicists may add unsigned studies to the board.',
    );
  }
  return { query, statuses: boardStatuses(viewer, query.drafts ?? false) };
}

const stamp = () => new Date().toISOString().slice(0, 10);

/**
 * The comparison board (JSON, CSV, PDF), its filter options, baselines,
 * room trends and the room summary. Every route needs a session; the board
 * is scoped to signed studies unless a physicist asks for unsigned ones.
 */
export function compareRouter(): Router {
  const router = Router();

  router.get('/compare/options', authenticate, async (req, res) => {
    res.json({
      data: {
        ...(await boardOptions()),
        permissions: comparePermissions(currentUser(req)),
      },
    });
  });

  router.get('/compare', authenticate, async (req, res) => {
    const { query, statuses } = boardRequest(req);
    const board = await loadBoard(query, statuses, query.limit);
    res.json({
      data: presentCompareBoard(query, statuses, board, currentUser(req)),
    });
  });

  router.get('/compare.csv', authenticate, async (req, res) => {
    const { query, statuses } = boardRequest(req);
    const board = await loadBoard(query, statuses, MAX_BOARD_CONDITIONS);
    res
      .type('text/csv; charset=utf-8')
      .attachment(`lamella-comparison-${stamp()}.csv`)
      .send(figuresCsv(presentBoardConditions(board)));
  });

  router.get('/compare.pdf', authenticate, async (req, res) => {
    const { query, statuses } = boardRequest(req);
    const board = await loadBoard(query, statuses, query.limit);
    const pdf = await renderBoardReportPdf({
      filters: await describeBoardFilters(query),
      scope: scopeOf(statuses),
      total: board.data.total,
      conditions: presentBoardConditions(board),
      charts: boardCharts(board.data),
      gridComparisons: gridComparisons(board.data),
      verdicts: verdictSummary(board.data),
      generatedAt: new Date(),
      generatedBy: currentUser(req).displayName,
    });
    res
      .type('application/pdf')
      .attachment(`lamella-comparison-${stamp()}.pdf`)
      .send(pdf);
  });

  router.get('/baselines', authenticate, async (req, res) => {
    const filter = listBaselinesQuerySchema.parse(req.query);
    const viewer = currentUser(req);
    const list = await listBaselines(filter);
    res.json({ data: list.map((b) => presentBaseline(b, viewer)) });
  });

  router.get('/baselines/:id', authenticate, async (req, res) => {
    const { id } = baselineIdParamsSchema.parse(req.params);
    const [described] = await describeBaselines([await findBaselineById(id)]);
    res.json({ data: presentBaseline(described!, currentUser(req)) });
  });

  router.post('/baselines', authenticate, async (req, res) => {
    const viewer = currentUser(req);
    authorize(canManageBaselines(viewer), 'Only physicists set baselines.');
    const input = createBaselineSchema.parse(req.body);
    const created = await createBaseline(input, {
      ...auditOf(req),
      actorId: viewer.id,
    });
    const [described] = await describeBaselines([created]);
    res.status(201).json({ data: presentBaseline(described!, viewer) });
  });

  router.patch('/baselines/:id', authenticate, async (req, res) => {
    const viewer = currentUser(req);
    authorize(canManageBaselines(viewer), 'Only physicists change baselines.');
    const { id } = baselineIdParamsSchema.parse(req.params);
    const input = updateBaselineSchema.parse(req.body);
    const baseline = await findBaselineById(id);
    const updated = await updateBaseline(baseline, input, {
      ...auditOf(req),
      actorId: viewer.id,
    });
    const [described] = await describeBaselines([updated]);
    res.json({ data: presentBaseline(described!, viewer) });
  });

  router.delete('/baselines/:id', authenticate, async (req, res) => {
    authorize(
      canManageBaselines(currentUser(req)),
      'Only physicists remove baselines.',
    );
    const { id } = baselineIdParamsSchema.parse(req.params);
    await deleteBaseline(await findBaselineById(id), auditOf(req));
    res.status(204).end();
  });

  router.get('/rooms/:id/trend', authenticate, async (req, res) => {
    const { id } = roomIdParamsSchema.parse(req.params);
    const { figures } = trendQuerySchema.parse(req.query);
    const viewer = currentUser(req);
    const trend = await roomTrend(
      id,
      figures ?? DEFAULT_TREND_FIGURES,
      async (ids) => {
        const described = await describeBaselinesByIds(ids);
        return new Map(
          described.map((d) => [d.baseline.id, presentBaseline(d, viewer)]),
        );
      },
    );
    res.json({
      data: {
        room: {
          id: trend.room.id,
          name: trend.room.name,
          site: trend.room.site,
        },
        groups: trend.groups,
        policyNote: trend.policyNote,
      },
    });
  });

  router.get('/room-summary', authenticate, async (_req, res) => {
    const summary = await roomSummaries();
    res.json({ data: summary.rooms, meta: { cautions: summary.cautions } });
  });

  return router;
}
