import type TestAgent from 'supertest/lib/agent.js';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { fromRoot } from '../../../server/config/paths.ts';
import { jobQueue, QUEUES, stopJobQueue } from '../../../server/jobs/queue.ts';
import { startRecomputeWorkers } from '../../../server/jobs/recompute-study.worker.ts';
import { AuditEvent } from '../../../server/models/audit-event.model.ts';
import { ConditionAnalysis } from '../../../server/models/condition-analysis.model.ts';
import { ConditionFigure } from '../../../server/models/condition-figure.model.ts';
import { Study } from '../../../server/models/study.model.ts';
import { createDiskImageStore } from '../../../server/services/image-storage.service.ts';
import type { AnalyzeJson } from '../../../server/cli/analyze.command.ts';
import { flattenConditionFigures } from '../../../shared/figures.ts';
import type {
  ResultsProgressDto,
  StudyResultsDto,
} from '../../../shared/schemas/results.schema.ts';
import { runLamella } from '../../helpers/dicom-cli.ts';
import { scratchDir } from '../../helpers/dicom-files.ts';
import { buildGrid, buildRoom } from '../../helpers/study-factories.ts';
import {
  browserAgent,
  signedInAgent,
  startTestApp,
  type TestApp,
} from '../../helpers/test-app.ts';
import {
  buildSyntheticStudy,
  DISC_LAYOUT,
  trueFigures,
  type SyntheticStudy,
} from '../jobs/synthetic-study.ts';

const UPLOADS = 'test-output/results-api/uploads';
let t: TestApp;
let physicist: TestAgent;
let s: SyntheticStudy;

/** Polls the progress until nothing is queued or running (bounded). */
async function waitUntilComputed(
  agent: TestAgent,
  studyId: number,
  timeoutMs = 60_000,
): Promise<ResultsProgressDto> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const res = await agent.get(`/api/studies/${studyId}/results/progress`);
    expect(res.status, res.text).toBe(200);
    const progress = res.body.data as ResultsProgressDto;
    if (!progress.isComputing) return progress;
    if (Date.now() > until) {
      throw new Error(`still computing after ${timeoutMs} ms: ${res.text}`);
    }
    await new Promise((resolve) => setTimeout(resolve, 200));
  }
}

async function results(
  agent: TestAgent,
  studyId: number,
): Promise<StudyResultsDto> {
  const res = await agent.get(`/api/studies/${studyId}/results`);
  expect(res.status, res.text).toBe(200);
  return res.body.data as StudyResultsDto;
}

/** A study with two planned conditions and no images. */
async function emptyStudy(agent: TestAgent, title: string): Promise<number> {
  const room = await buildRoom();
  const grid = await buildGrid(12, room.id);
  const res = await agent.post('/api/studies').send({
    title,
    purpose: 'A study without images yet.',
    roomId: room.id,
    gridIds: [grid.id],
    plan: {
      phantom: { material: 'pmma', thicknessesCm: [15], contrastObjects: [] },
      beamQualities: [{ kvp: 60 }, { kvp: 80 }],
      geometry: { sidCm: 115, fieldWidthCm: 30, fieldHeightCm: 30 },
      exposure: { mode: 'aec', chamber: 'centre' },
      replicates: 1,
    },
  });
  expect(res.status, res.text).toBe(201);
  return res.body.data.id as number;
}

beforeAll(async () => {
  scratchDir('results-api');
  t = await startTestApp({ uploadsDir: UPLOADS });
  physicist = (await signedInAgent(t.app, 'physicist')).agent;
  // Jobs left by other test files (studies whose files are gone) would be
  // worked before ours.
  await (await jobQueue()).purgeQueue(QUEUES.recomputeStudy.name);
  s = await buildSyntheticStudy(
    physicist,
    fromRoot('test-output/results-api/session'),
  );
  const saved = await physicist
    .put(`/api/studies/${s.studyId}/layout`)
    .send({ layout: DISC_LAYOUT, referenceImageId: null });
  expect(saved.status, saved.text).toBe(200);
  await startRecomputeWorkers(
    1,
    { store: createDiskImageStore(fromRoot(UPLOADS)) },
    {
      pollingIntervalSeconds: 0.5,
    },
  );
});

afterAll(async () => {
  await stopJobQueue();
  await t.close();
});

describe('results of a study built from synthetic files', () => {
  it('recomputes on demand in the job queue, showing progress until done', async () => {
    const res = await physicist
      .post(`/api/studies/${s.studyId}/results/recompute`)
      .send({});
    expect(res.status, res.text).toBe(202);
    const queued = res.body.data as ResultsProgressDto;
    expect(queued.total).toBe(2);
    expect(queued.queued + queued.running + queued.done).toBe(2);
    const done = await waitUntilComputed(physicist, s.studyId);
    expect(done).toMatchObject({
      total: 2,
      done: 2,
      failed: 0,
      isComputing: false,
    });
    const audit = await AuditEvent.findAll({
      where: { targetType: 'study', targetId: String(s.studyId) },
    });
    const actions = audit.map((e) => e.action);
    expect(actions).toContain('study.results_recompute_requested');
    expect(actions).toContain('study.results_computed');
    expect(actions).toContain('study.layout_saved');
  });

  it('stores and presents each figure with its 95 % interval, agreeing with the built physics', async () => {
    const body = await results(physicist, s.studyId);
    expect(body.layout?.name).toBe(DISC_LAYOUT.name);
    expect(body.permissions.recompute).toBe(true);
    for (const condition of body.conditions) {
      expect(condition.status).toBe('done');
      expect(condition.primaryObject).toBe('disc');
      expect(condition.imageCounts).toEqual({ grid: 2, noGrid: 2 });
      const truth = trueFigures(condition.kvp);
      const figure = (key: string) =>
        condition.figures.find((f) => f.key === key)!;
      // Analytic K = Tp/Tt and Tt = (Tp + SPR·Ts)/(1 + SPR): PHYSICS.md §2;
      // agreement within k = 3 standard errors as issue 4 asks.
      for (const [key, expected] of [
        ['contrast_improvement_factor', truth.contrastImprovementFactor],
        ['total_transmission', truth.totalTransmission],
        ['primary_transmission', truth.primaryTransmission],
      ] as const) {
        const f = figure(key);
        expect(f.ciLow).toBeLessThan(f.value);
        expect(f.ciHigh).toBeGreaterThan(f.value);
        expect(f.basis).toBe('replicates');
        expect(Math.abs(f.value - expected)).toBeLessThan(
          3 * f.standardError + 1e-9,
        );
      }
      expect(figure('snr_improvement_factor').value).toBeGreaterThan(0);
      expect(condition.verdict?.sentence).toMatch(/SIF \d/);
      expect(condition.method).toMatchObject({
        cnrDefinition: 'background-sd',
        doseMeasure: 'mas',
        layoutName: DISC_LAYOUT.name,
        calibration: null,
      });
      expect(condition.objects.map((o) => o.name)).toEqual(['disc']);
      const analysis = await ConditionAnalysis.findOne({
        where: { conditionId: condition.conditionId },
      });
      expect(analysis?.status).toBe('done');
      expect(
        await ConditionFigure.count({ where: { analysisId: analysis!.id } }),
      ).toBe(condition.figures.length);
    }
  });

  it('stores exactly the figures lamella analyze prints for the same files and layout', () => {
    const run = runLamella([
      'analyze',
      s.folder,
      '--layout',
      s.layoutFile,
      '--json',
    ]);
    expect(run.status, run.stderr).toBe(0);
    const cli = JSON.parse(run.stdout) as AnalyzeJson;
    expect(cli.conditions).toHaveLength(2);
    return (async () => {
      const body = await results(physicist, s.studyId);
      for (const c of cli.conditions) {
        const ours = body.conditions.find((x) => x.kvp === c.key.kvp)!;
        const theirs = flattenConditionFigures(c.analysis!.objects[0]!.figures);
        expect(ours.figures.map((f) => f.key)).toEqual(
          theirs.map((f) => f.key),
        );
        for (const { key, estimate } of theirs) {
          const f = ours.figures.find((x) => x.key === key)!;
          expect([key, f.value, f.ciLow, f.ciHigh]).toEqual([
            key,
            estimate.value,
            estimate.ci95.low,
            estimate.ci95.high,
          ]);
        }
        expect(ours.verdict?.sentence).toBe(
          c.analysis!.objects[0]!.figures.verdict?.sentence,
        );
      }
    })();
  });

  it('recomputes with new settings and keeps them for later runs', async () => {
    const res = await physicist
      .post(`/api/studies/${s.studyId}/results/recompute`)
      .send({
        settings: {
          cnrDefinition: 'pooled-sd',
          detrend: 'none',
          noise: 'region',
          doseMeasure: 'mas',
        },
      });
    expect(res.status, res.text).toBe(202);
    await waitUntilComputed(physicist, s.studyId);
    const body = await results(physicist, s.studyId);
    expect(body.settings.cnrDefinition).toBe('pooled-sd');
    expect(body.conditions[0]!.method?.cnrDefinition).toBe('pooled-sd');
  });

  it('marks conditions failed with a clear code and message when they cannot be analysed', async () => {
    const studyId = await emptyStudy(physicist, 'No layout, no images');
    await physicist
      .post(`/api/studies/${studyId}/results/recompute`)
      .send({})
      .expect(202);
    await waitUntilComputed(physicist, studyId);
    let body = await results(physicist, studyId);
    expect(body.conditions.map((c) => [c.status, c.error?.code])).toEqual([
      ['failed', 'layout_missing'],
      ['failed', 'layout_missing'],
    ]);
    expect(body.conditions[0]!.error?.message).toMatch(/no region layout/);
    await physicist
      .put(`/api/studies/${studyId}/layout`)
      .send({ layout: DISC_LAYOUT, referenceImageId: null })
      .expect(200);
    await waitUntilComputed(physicist, studyId);
    body = await results(physicist, studyId);
    expect(body.conditions.map((c) => c.error?.code)).toEqual([
      'images_missing',
      'images_missing',
    ]);
    expect(body.conditions[0]!.error?.message).toMatch(
      /0 image\(s\) with the grid and 0 without/,
    );
    expect(body.conditions[0]!.figures).toEqual([]);
  });
});

describe('results routes: who may do what', () => {
  it('answers 401 without a session', async () => {
    await request(t.app).get(`/api/studies/${s.studyId}/results`).expect(401);
    await browserAgent(t.app)
      .post(`/api/studies/${s.studyId}/results/recompute`)
      .send({})
      .expect(401);
    await request(t.app)
      .get(`/api/studies/${s.studyId}/results/progress`)
      .expect(401);
  });

  it('lets every staff role read a draft study and hides it from the committee', async () => {
    for (const role of ['admin', 'resident'] as const) {
      const { agent } = await signedInAgent(t.app, role);
      const body = await results(agent, s.studyId);
      expect(body.permissions.recompute).toBe(false);
    }
    const { agent: committee } = await signedInAgent(t.app, 'committee');
    const res = await committee.get(`/api/studies/${s.studyId}/results`);
    expect(res.status).toBe(404);
    expect(res.body.error.code).toBe('not_found');
  });

  it('refuses a recomputation to roles that may not change the study', async () => {
    for (const role of ['admin', 'resident'] as const) {
      const { agent } = await signedInAgent(t.app, role);
      const res = await agent
        .post(`/api/studies/${s.studyId}/results/recompute`)
        .send({});
      expect(res.status, role).toBe(403);
      expect(res.body.error.code).toBe('forbidden');
    }
    const { agent: committee } = await signedInAgent(t.app, 'committee');
    const hidden = await committee
      .post(`/api/studies/${s.studyId}/results/recompute`)
      .send({});
    expect(hidden.status).toBe(404);
  });

  it('refuses bad settings with field details', async () => {
    const res = await physicist
      .post(`/api/studies/${s.studyId}/results/recompute`)
      .send({ settings: { cnrDefinition: 'median' } });
    expect(res.status).toBe(400);
    expect(res.body.error.details[0].path).toBe('settings.cnrDefinition');
  });

  it('shows a signed study to the committee and refuses any recomputation (409)', async () => {
    const studyId = await emptyStudy(physicist, 'Signed already');
    await Study.update({ status: 'signed' }, { where: { id: studyId } });
    const { agent: committee } = await signedInAgent(t.app, 'committee');
    const read = await results(committee, studyId);
    expect(read.permissions.recompute).toBe(false);
    const denied = await committee
      .post(`/api/studies/${studyId}/results/recompute`)
      .send({});
    expect(denied.status).toBe(403);
    const locked = await physicist
      .post(`/api/studies/${studyId}/results/recompute`)
      .send({});
    expect(locked.status).toBe(409);
    expect(locked.body.error.code).toBe('study_locked');
    expect(locked.body.error.message).toMatch(/signed and read-only/);
  });
});
