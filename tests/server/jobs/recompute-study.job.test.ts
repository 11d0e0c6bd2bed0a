import { spawn } from 'node:child_process';
import { once } from 'node:events';
import type TestAgent from 'supertest/lib/agent.js';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { fromRoot } from '../../../server/config/paths.ts';
import { sequelize } from '../../../server/db/sequelize.ts';
import { jobQueue, QUEUES, stopJobQueue } from '../../../server/jobs/queue.ts';
import {
  enqueueDetectorRecompute,
  enqueueStudyRecompute,
  settleDeferredEnqueues,
} from '../../../server/jobs/recompute-study.job.ts';
import {
  startRecomputeWorkers,
  workersInProcess,
} from '../../../server/jobs/recompute-study.worker.ts';
import { ConditionAnalysis } from '../../../server/models/condition-analysis.model.ts';
import { Study } from '../../../server/models/study.model.ts';
import { createDiskImageStore } from '../../../server/services/image-storage.service.ts';
import { scratchDir } from '../../helpers/dicom-files.ts';
import { buildDetector } from '../../helpers/study-factories.ts';
import {
  signedInAgent,
  startTestApp,
  type TestApp,
} from '../../helpers/test-app.ts';
import {
  buildSyntheticStudy,
  DISC_LAYOUT,
  type SyntheticStudy,
} from './synthetic-study.ts';

const UPLOADS = 'test-output/jobs/uploads';
let t: TestApp;
let physicist: TestAgent;
let s: SyntheticStudy;

/** Jobs of the study still waiting in the queue (not yet taken by a worker). */
async function waitingJobs(studyId: number): Promise<number> {
  const boss = await jobQueue();
  const { rows } = await boss
    .getDb()
    .executeSql(
      `SELECT count(*)::int AS n FROM pgboss.job WHERE name = $1 AND singleton_key = $2 AND state IN ('created', 'retry')`,
      [QUEUES.recomputeStudy.name, `study-${studyId}`],
    );
  return (rows[0] as { n: number }).n;
}

async function statuses(studyId: number): Promise<string[]> {
  const rows = await ConditionAnalysis.findAll({ where: { studyId } });
  return rows.map((r) => r.status);
}

/** Polls until `done` holds, failing after `timeoutMs`. */
async function eventually(
  done: () => Promise<boolean>,
  timeoutMs = 60_000,
): Promise<void> {
  const until = Date.now() + timeoutMs;
  while (!(await done())) {
    if (Date.now() > until) throw new Error(`not done within ${timeoutMs} ms`);
    await new Promise((resolve) => setTimeout(resolve, 200));
  }
}

beforeAll(async () => {
  scratchDir('jobs');
  t = await startTestApp({ uploadsDir: UPLOADS });
  physicist = (await signedInAgent(t.app, 'physicist')).agent;
  await (await jobQueue()).purgeQueue(QUEUES.recomputeStudy.name);
  s = await buildSyntheticStudy(
    physicist,
    fromRoot('test-output/jobs/session'),
    { kvps: [70] },
  );
  await physicist
    .put(`/api/studies/${s.studyId}/layout`)
    .send({ layout: DISC_LAYOUT, referenceImageId: null })
    .expect(200);
  // The saves above queue their own jobs after commit; start from an empty queue.
  await settleDeferredEnqueues();
  await (await jobQueue()).purgeQueue(QUEUES.recomputeStudy.name);
});

afterAll(async () => {
  await stopJobQueue();
  await t.close();
});

describe('enqueueStudyRecompute', () => {
  it('marks every condition queued and keeps one waiting job per study', async () => {
    expect(await enqueueStudyRecompute(s.studyId, { reason: 'test' })).toBe(
      'queued',
    );
    expect(await enqueueStudyRecompute(s.studyId, { reason: 'again' })).toBe(
      'already_waiting',
    );
    expect(await waitingJobs(s.studyId)).toBe(1);
    expect(await statuses(s.studyId)).toEqual(['queued']);
  });

  it('leaves a submitted or signed study alone', async () => {
    const other = await buildSyntheticStudy(
      physicist,
      fromRoot('test-output/jobs/signed'),
      {
        kvps: [90],
      },
    );
    await settleDeferredEnqueues();
    await (await jobQueue()).purgeQueue(QUEUES.recomputeStudy.name);
    await Study.update(
      { status: 'submitted' },
      { where: { id: other.studyId } },
    );
    expect(await enqueueStudyRecompute(other.studyId)).toBe('study_locked');
    expect(await waitingJobs(other.studyId)).toBe(0);
    expect(await enqueueStudyRecompute(2_000_000_000)).toBe('no_study');
  });

  it('sends the job only when the change commits', async () => {
    const other = await buildSyntheticStudy(
      physicist,
      fromRoot('test-output/jobs/tx'),
      { kvps: [90] },
    );
    await settleDeferredEnqueues();
    await (await jobQueue()).purgeQueue(QUEUES.recomputeStudy.name);
    await sequelize
      .transaction(async (transaction) => {
        expect(
          await enqueueStudyRecompute(other.studyId, { transaction }),
        ).toBe('after_commit');
        throw new Error('roll back');
      })
      .catch(() => undefined);
    await settleDeferredEnqueues();
    expect(await waitingJobs(other.studyId)).toBe(0);
    await sequelize.transaction(async (transaction) => {
      await enqueueStudyRecompute(other.studyId, { transaction });
    });
    await settleDeferredEnqueues();
    expect(await waitingJobs(other.studyId)).toBe(1);
    await (await jobQueue()).purgeQueue(QUEUES.recomputeStudy.name);
  });

  it('queues the open studies of a detector whose calibration changed', async () => {
    const study = await Study.findByPk(s.studyId);
    const detector = await buildDetector(study!.roomId);
    await study!.update({ detectorId: detector.id });
    await (await jobQueue()).purgeQueue(QUEUES.recomputeStudy.name);
    expect(await enqueueDetectorRecompute(detector.id)).toEqual([s.studyId]);
    expect(await waitingJobs(s.studyId)).toBe(1);
  });
});

describe('a separate worker process', () => {
  it('takes a job sent from this process through the shared PostgreSQL queue', async () => {
    const child = spawn(
      process.execPath,
      ['--import', 'tsx', 'server/worker.ts'],
      {
        cwd: fromRoot('.'),
        env: { ...process.env, UPLOADS_DIR: UPLOADS },
        stdio: ['ignore', 'pipe', 'pipe'],
      },
    );
    let output = '';
    child.stdout.on('data', (chunk: Buffer) => (output += chunk.toString()));
    child.stderr.on('data', (chunk: Buffer) => (output += chunk.toString()));
    try {
      await ConditionAnalysis.update(
        { status: 'failed' },
        { where: { studyId: s.studyId } },
      );
      expect(
        await enqueueStudyRecompute(s.studyId, { reason: 'other process' }),
      ).not.toBe('study_locked');
      await eventually(async () =>
        (await statuses(s.studyId)).every((x) => x === 'done'),
      );
      expect(output).toContain('taking recompute jobs');
    } finally {
      child.kill('SIGTERM');
      await once(child, 'exit');
    }
  });
});

describe('the recompute worker', () => {
  it('works the waiting job until every condition is done (bounded wait)', async () => {
    await ConditionAnalysis.update(
      { status: 'failed' },
      { where: { studyId: s.studyId } },
    );
    expect(await enqueueStudyRecompute(s.studyId)).toBe('queued');
    await startRecomputeWorkers(
      1,
      { store: createDiskImageStore(fromRoot(UPLOADS)) },
      {
        pollingIntervalSeconds: 0.5,
      },
    );
    await eventually(async () =>
      (await statuses(s.studyId)).every((x) => x === 'done'),
    );
    const row = await ConditionAnalysis.findOne({
      where: { studyId: s.studyId },
    });
    expect(row?.verdictSentence).toMatch(/SIF/);
    expect(row?.computedAt).not.toBeNull();
    expect(await waitingJobs(s.studyId)).toBe(0);
  });

  it('fails a job whose data does not say which study', async () => {
    const boss = await jobQueue();
    const id = await boss.send(
      QUEUES.recomputeStudy.name,
      { studyId: 'seven' },
      { retryLimit: 0 },
    );
    await eventually(
      async () =>
        (await boss.getJobById(QUEUES.recomputeStudy.name, id!))?.state ===
        'failed',
    );
  });
});

describe('workersInProcess', () => {
  it('reads WORKERS_IN_PROCESS: one by default, 0 to leave the work to worker processes', () => {
    expect(workersInProcess({})).toBe(1);
    expect(workersInProcess({ WORKERS_IN_PROCESS: '0' })).toBe(0);
    expect(workersInProcess({ WORKERS_IN_PROCESS: '3' })).toBe(3);
    expect(() => workersInProcess({ WORKERS_IN_PROCESS: 'many' })).toThrow();
  });
});
