import { z } from 'zod';
import type { AppConfig } from '../config/env.ts';
import { fromRoot } from '../config/paths.ts';
import { createDiskImageStore } from '../services/image-storage.service.ts';
import {
  recomputeStudy,
  type ResultsDeps,
} from '../services/study-results.service.ts';
import { jobQueue, QUEUES, startJobQueue, stopJobQueue } from './queue.ts';
import {
  clearLocalWorkers,
  recomputeStudyJobSchema,
  registerLocalWorker,
  settleDeferredEnqueues,
  type RecomputeStudyJob,
} from './recompute-study.job.ts';

/** Options of {@link startRecomputeWorkers}. */
export interface RecomputeWorkerOptions {
  /** How often an idle worker looks for a job; default 2 s (pg-boss's minimum is 0.5 s). */
  pollingIntervalSeconds?: number;
}

/**
 * Starts `count` workers of the `recompute-study` queue in this process,
 * each taking one job at a time; a job's data is checked before use and a
 * job whose study has gone completes without doing anything. A thrown
 * error fails the job, which pg-boss retries (retryLimit of the queue).
 * @returns the pg-boss worker ids.
 */
export async function startRecomputeWorkers(
  count: number,
  deps: ResultsDeps,
  options: RecomputeWorkerOptions = {},
): Promise<string[]> {
  const boss = await jobQueue();
  const ids: string[] = [];
  for (let i = 0; i < count; i += 1) {
    const id = await boss.work<RecomputeStudyJob>(
      QUEUES.recomputeStudy.name,
      {
        batchSize: 1,
        pollingIntervalSeconds: options.pollingIntervalSeconds ?? 2,
      },
      async ([job]) => {
        const data = recomputeStudyJobSchema.parse(job!.data);
        return recomputeStudy(data.studyId, deps);
      },
    );
    registerLocalWorker(id);
    ids.push(id);
  }
  return ids;
}

const workerEnvSchema = z.object({
  WORKERS_IN_PROCESS: z.coerce.number().int().min(0).max(32).default(1),
});

/**
 * How many recompute workers the web server runs itself
 * (`WORKERS_IN_PROCESS`, default 1; 0 leaves the work to separate
 * `node dist/server/worker.js` processes).
 * @throws ZodError at boot for a value that is not a whole number 0–32.
 */
export const workersInProcess = (
  env: NodeJS.ProcessEnv = process.env,
): number => workerEnvSchema.parse(env).WORKERS_IN_PROCESS;

/** The image store the workers read from, as the server configures it. */
export const workerDeps = (config: AppConfig): ResultsDeps => ({
  store: createDiskImageStore(fromRoot(config.uploadsDir)),
});

/**
 * Starts the job queue of this process with `workers` recompute workers.
 * @returns how to stop it (workers finish their jobs first).
 */
export async function startJobs(
  config: AppConfig,
  workers: number,
): Promise<{ workers: number; stop(): Promise<void> }> {
  await startJobQueue({ databaseUrl: config.databaseUrl, supervise: true });
  if (workers > 0) await startRecomputeWorkers(workers, workerDeps(config));
  return {
    workers,
    stop: async () => {
      await settleDeferredEnqueues();
      clearLocalWorkers();
      await stopJobQueue();
    },
  };
}
