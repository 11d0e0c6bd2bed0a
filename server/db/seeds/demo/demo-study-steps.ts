import { mkdir, mkdtemp, rm } from 'node:fs/promises';
import path from 'node:path';
import { QueryTypes } from 'sequelize';
import type { RegionLayout } from '../../../../shared/analysis/region-layout.ts';
import {
  applyLayoutSchema,
  setStudyLayoutSchema,
} from '../../../../shared/schemas/layout.schema.ts';
import {
  createStudySchema,
  type SaveAssignmentsInput,
} from '../../../../shared/schemas/study.schema.ts';
import { jobQueue, QUEUES } from '../../../jobs/queue.ts';
import { StudyCondition } from '../../../models/study-condition.model.ts';
import type { Study } from '../../../models/study.model.ts';
import type { AuditContext } from '../../../services/audit.service.ts';
import { ingestUploads } from '../../../services/image-ingest.service.ts';
import {
  proposeStudyPairing,
  saveAssignments,
} from '../../../services/image-pairing.service.ts';
import type { PixelCache } from '../../../services/image-pixels.service.ts';
import type { ImageStore } from '../../../services/image-storage.service.ts';
import { applyStudyLayout } from '../../../services/image-region.service.ts';
import { setStudyLayout } from '../../../services/region-layout.service.ts';
import { recomputeStudy } from '../../../services/study-results.service.ts';
import { createStudy } from '../../../services/study.service.ts';
import { writePhantomSession } from '../../../synthetic/phantom-session.ts';
import { sequelize } from '../../sequelize.ts';
import type { DemoEquipment } from '../20261201090000-demo-equipment.ts';
import {
  demoSessions,
  demoStudyPlan,
  type DemoExposure,
  type DemoStudySpec,
} from './demo-session-plan.ts';

/**
 * The steps a person takes with a study, done through Lamella's own
 * services in the order the pages offer them: create from a plan, upload
 * the session, confirm the pairing, save and apply a layout, compute.
 */

/** What every step needs: where files go, the decoded-image cache, limits. */
export interface DemoStepContext {
  store: ImageStore;
  pixels: PixelCache;
  maxFileBytes: number;
  maxFilesPerRequest: number;
}

/** A person acting, as the services record them. */
export type DemoActor = AuditContext & { actorId: number };

/** Longest wait for a change's recompute request to be queued. */
const QUEUE_WAIT_MS = 30_000;

/** Creates the study as its author would from the plan form. */
export function createDemoStudy(
  spec: DemoStudySpec,
  equipment: DemoEquipment,
  actor: DemoActor,
): Promise<Study> {
  return createStudy(
    createStudySchema.parse({
      title: spec.title,
      purpose: spec.purpose,
      roomId: equipment.rooms[spec.room].id,
      detectorId: equipment.detectors[spec.room].id,
      gridIds: [equipment.grids[spec.grid].id],
      plan: demoStudyPlan(spec),
    }),
    actor,
  );
}

/**
 * Generates the study's session with the phantom generator into a temp
 * folder beside the image store and uploads it through the ingest service,
 * as a dropped folder would be.
 * @returns where each stored image belongs in the plan, by image id.
 * @throws Error when any file is not stored (a duplicate means the demo's
 *   images are already in this database).
 */
export async function uploadDemoSession(
  spec: DemoStudySpec,
  studyId: number,
  actor: DemoActor,
  ctx: DemoStepContext,
): Promise<Map<number, DemoExposure>> {
  await mkdir(ctx.store.tempDir, { recursive: true });
  const dir = await mkdtemp(path.join(ctx.store.tempDir, 'demo-session-'));
  try {
    const exposures = new Map<string, DemoExposure>();
    for (const session of demoSessions(spec)) {
      await writePhantomSession(dir, session.plan);
      for (const e of session.plan.exposures) exposures.set(e.fileName, e);
    }
    const results = await ingestUploads(
      [...exposures.keys()].map((name) => ({
        originalName: name,
        tempPath: path.join(dir, name),
      })),
      {
        audit: actor,
        studyId,
        store: ctx.store,
        maxFileBytes: ctx.maxFileBytes,
        maxFilesPerRequest: ctx.maxFilesPerRequest,
      },
    );
    const placed = new Map<number, DemoExposure>();
    for (const r of results) {
      if (r.outcome !== 'stored' || !r.image) {
        throw new Error(
          `demo image ${r.name} was not stored (${r.outcome}): ${r.message ?? ''}`,
        );
      }
      placed.set(r.image.id, exposures.get(r.name)!);
    }
    return placed;
  } finally {
    await rm(dir, { recursive: true, force: true });
  }
}

async function requestedAt(studyId: number): Promise<string | null> {
  const rows = await sequelize.query<{ at: string }>(
    'SELECT requested_at::text AS at FROM study_analysis_settings WHERE study_id = :studyId',
    { replacements: { studyId }, type: QueryTypes.SELECT },
  );
  return rows[0]?.at ?? null;
}

async function waitingJobIds(studyId: number): Promise<string[]> {
  const boss = await jobQueue();
  const { rows } = await boss
    .getDb()
    .executeSql(
      `SELECT id::text AS id FROM pgboss.job WHERE name = $1 AND singleton_key = $2 AND state IN ('created', 'retry')`,
      [QUEUES.recomputeStudy.name, `study-${studyId}`],
    );
  return (rows as Array<{ id: string }>).map((r) => r.id);
}

/**
 * Runs a change that asks for a recompute after it commits, and waits until
 * that request is recorded and a job waits for the study, so the
 * computation the seed runs next is not overtaken by it.
 */
export async function withQueuedRecompute<T>(
  studyId: number,
  change: () => Promise<T>,
): Promise<T> {
  const before = await requestedAt(studyId);
  const result = await change();
  const until = Date.now() + QUEUE_WAIT_MS;
  for (;;) {
    const now = await requestedAt(studyId);
    if (
      now !== null &&
      now !== before &&
      (await waitingJobIds(studyId)).length > 0
    ) {
      return result;
    }
    if (Date.now() > until) {
      throw new Error(
        `the recompute of demo study ${studyId} was not queued within ${QUEUE_WAIT_MS} ms`,
      );
    }
    await new Promise((resolve) => setTimeout(resolve, 20));
  }
}

/**
 * Confirms the pairing: Lamella's proposal when it puts every image where
 * the session sheet says, else the sheet's places entered by hand.
 */
export async function confirmDemoPairing(
  study: Study,
  placed: Map<number, DemoExposure>,
  actor: DemoActor,
): Promise<void> {
  const conditions = await StudyCondition.findAll({
    where: { studyId: study.id },
  });
  const conditionOf = (e: DemoExposure) =>
    conditions.find(
      (c) => c.kvp === e.kvp && c.phantomThicknessCm === e.thicknessCm,
    )!;
  const { proposals } = await proposeStudyPairing(study);
  const right = proposals.filter((p) => {
    const e = placed.get(p.imageId);
    return (
      e !== undefined &&
      p.status === 'confident' &&
      p.conditionId === conditionOf(e).id &&
      p.arm === e.arm &&
      p.replicate !== null
    );
  });
  const useProposal = right.length === placed.size;
  const assignments: SaveAssignmentsInput['assignments'] = [
    ...placed.entries(),
  ].map(([imageId, e]) => {
    const p = proposals.find((q) => q.imageId === imageId)!;
    return useProposal
      ? {
          imageId,
          conditionId: p.conditionId!,
          arm: p.arm!,
          replicate: p.replicate!,
          proposedBy: 'auto',
          reason: p.reasons.join('; ').slice(0, 1000),
        }
      : {
          imageId,
          conditionId: conditionOf(e).id,
          arm: e.arm,
          replicate: e.replicate,
          proposedBy: 'user',
          reason: 'Placed by hand from the session sheet.',
        };
  });
  await withQueuedRecompute(study.id, () =>
    saveAssignments(study.id, { assignments }, actor),
  );
}

/**
 * Saves the study's layout, drawn on its first image with the grid, and
 * applies it to every image.
 * @throws Error when the automatic shift could not follow the phantom.
 */
export async function layOutDemoStudy(
  studyId: number,
  layout: RegionLayout,
  referenceImageId: number,
  autoShift: boolean,
  actor: DemoActor,
  ctx: DemoStepContext,
): Promise<void> {
  await withQueuedRecompute(studyId, () =>
    setStudyLayout(
      studyId,
      setStudyLayoutSchema.parse({ layout, referenceImageId }),
      actor,
    ),
  );
  await applyDemoLayout(studyId, autoShift, actor, ctx);
}

/**
 * Applies the study's layout to its images, following the phantom or not.
 * @throws Error when the automatic shift could not follow the phantom.
 */
export async function applyDemoLayout(
  studyId: number,
  autoShift: boolean,
  actor: DemoActor,
  ctx: DemoStepContext,
): Promise<void> {
  const { warnings } = await withQueuedRecompute(studyId, () =>
    applyStudyLayout(
      studyId,
      applyLayoutSchema.parse({ autoShift }),
      ctx.pixels,
      actor,
    ),
  );
  const untrusted = warnings.filter((w) => w.code === 'shift_not_trusted');
  if (untrusted.length > 0) {
    throw new Error(
      `demo study ${studyId}: ${untrusted.map((w) => w.message).join(' ')}`,
    );
  }
}

/**
 * Computes every condition of the study now, in this process (the seed does
 * not wait for a worker), then withdraws the job its changes queued: the
 * results it would compute are these, and a worker must not rewrite them
 * once the study is signed.
 * @throws Error when a condition could not be analysed.
 */
export async function computeDemoResults(
  studyId: number,
  ctx: DemoStepContext,
): Promise<void> {
  const summary = await recomputeStudy(studyId, { store: ctx.store });
  if (summary.failed > 0) {
    throw new Error(
      `demo study ${studyId}: ${summary.failed} condition(s) could not be analysed`,
    );
  }
  const waiting = await waitingJobIds(studyId);
  if (waiting.length > 0) {
    await (await jobQueue()).deleteJob(QUEUES.recomputeStudy.name, waiting);
  }
}
