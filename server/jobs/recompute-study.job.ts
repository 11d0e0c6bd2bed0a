import { Op, QueryTypes, type Transaction } from 'sequelize';
import { z } from 'zod';
import {
  analysisSettingsSchema,
  type AnalysisSettings,
} from '../../shared/schemas/results.schema.ts';
import { isOpenForChanges } from '../../shared/studies/study-state.ts';
import { sequelize } from '../db/sequelize.ts';
import { Study } from '../models/study.model.ts';
import { jobQueue, QUEUES } from './queue.ts';

/** The data of a `recompute-study` job, checked when a worker takes it. */
export const recomputeStudyJobSchema = z.object({
  studyId: z.number().int().positive(),
  reason: z.string().max(200),
});
export type RecomputeStudyJob = z.infer<typeof recomputeStudyJobSchema>;

/** What became of an enqueue request. */
export type EnqueueOutcome =
  'queued' | 'already_waiting' | 'study_locked' | 'no_study' | 'after_commit';

const localWorkers = new Set<string>();
/** Sends deferred to a commit that have not finished yet. */
const pending = new Set<Promise<unknown>>();

/** Resolves when every send deferred to a commit has been made (or failed). */
export async function settleDeferredEnqueues(): Promise<void> {
  await Promise.allSettled([...pending]);
}

/** Remembers a worker of this process, to wake it when a job is sent from here. */
export function registerLocalWorker(workerId: string): void {
  localWorkers.add(workerId);
}

/** Forgets this process's workers (the queue stopped). */
export function clearLocalWorkers(): void {
  localWorkers.clear();
}

/**
 * Records a request for the study's results (with `settings`, they replace
 * the stored ones) and marks every condition queued, creating its analysis
 * row when it has none, so the progress shows at once.
 */
export async function markStudyQueued(
  studyId: number,
  settings?: AnalysisSettings,
): Promise<void> {
  await sequelize.transaction(async (transaction) => {
    // The settings row is also what a worker locks to decide whether a
    // newer request overtook its run, so the two serialise here.
    await sequelize.query(
      `INSERT INTO study_analysis_settings (study_id, settings, requested_at, created_at, updated_at)
       VALUES (:studyId, :settings::jsonb, clock_timestamp(), now(), now())
       ON CONFLICT (study_id) DO UPDATE
         SET settings = CASE WHEN :hasSettings THEN EXCLUDED.settings
                             ELSE study_analysis_settings.settings END,
             requested_at = clock_timestamp(),
             updated_at = now()`,
      {
        replacements: {
          studyId,
          hasSettings: settings !== undefined,
          settings: JSON.stringify(
            settings ?? analysisSettingsSchema.parse({}),
          ),
        },
        type: QueryTypes.INSERT,
        transaction,
      },
    );
    await sequelize.query(
      `INSERT INTO condition_analyses
         (study_id, condition_id, status, options, warnings, created_at, updated_at)
       SELECT c.study_id, c.id, 'queued', '{}'::jsonb, '[]'::jsonb, now(), now()
         FROM study_conditions c WHERE c.study_id = :studyId
       ON CONFLICT (condition_id) DO UPDATE SET status = 'queued', updated_at = now()`,
      { replacements: { studyId }, type: QueryTypes.INSERT, transaction },
    );
  });
}

async function enqueueNow(
  studyId: number,
  reason: string,
  settings: AnalysisSettings | undefined,
): Promise<EnqueueOutcome> {
  const study = await Study.findByPk(studyId, { attributes: ['id', 'status'] });
  if (!study) return 'no_study';
  // Results of a study under review or signed are what was reviewed; they
  // change only in a new revision.
  if (!isOpenForChanges(study.status)) return 'study_locked';
  await markStudyQueued(studyId, settings);
  const boss = await jobQueue();
  const id = await boss.send(
    QUEUES.recomputeStudy.name,
    { studyId, reason } satisfies RecomputeStudyJob,
    { singletonKey: `study-${studyId}` },
  );
  for (const worker of localWorkers) boss.notifyWorker(worker);
  return id ? 'queued' : 'already_waiting';
}

/** Options of {@link enqueueStudyRecompute}. */
export interface EnqueueOptions {
  /** Why, for the job's record, e.g. "assignments saved". */
  reason?: string;
  /** Settings for this and later runs; the stored ones when absent. */
  settings?: AnalysisSettings;
  /**
   * The transaction that makes the change: the job is sent after it
   * commits (never for a rollback), so a worker cannot read the old data.
   */
  transaction?: Transaction;
}

/**
 * Asks for the study's results to be recomputed by a worker: marks every
 * condition queued and sends a `recompute-study` job (one waits per study;
 * a request while one waits joins it). Call it whenever regions, the
 * detector calibration or the image assignments of the study change.
 * Studies that are submitted or signed are left alone.
 * @returns what happened; 'after_commit' when deferred to a transaction
 *   (failures then are logged, not thrown, as the change itself stands).
 * @throws database or queue errors when not deferred.
 */
export async function enqueueStudyRecompute(
  studyId: number,
  options: EnqueueOptions = {},
): Promise<EnqueueOutcome> {
  const reason = options.reason ?? 'change';
  if (options.transaction) {
    options.transaction.afterCommit(() => {
      const sent = enqueueNow(studyId, reason, options.settings).catch(
        (error: unknown) =>
          console.error(`recompute of study ${studyId} not queued:`, error),
      );
      pending.add(sent);
      void sent.finally(() => pending.delete(sent));
    });
    return 'after_commit';
  }
  return enqueueNow(studyId, reason, options.settings);
}

/**
 * Queues a recomputation of every open study (draft or returned) made with
 * the detector: its calibration changed.
 * @returns the ids of the studies queued.
 */
export async function enqueueDetectorRecompute(
  detectorId: number,
  options: Pick<EnqueueOptions, 'transaction'> = {},
): Promise<number[]> {
  const studies = await Study.findAll({
    attributes: ['id'],
    where: { detectorId, status: { [Op.in]: ['draft', 'returned'] } },
    transaction: options.transaction,
  });
  for (const study of studies) {
    await enqueueStudyRecompute(study.id, {
      reason: 'detector calibration changed',
      transaction: options.transaction,
    });
  }
  return studies.map((s) => s.id);
}
