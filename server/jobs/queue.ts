import PgBoss from 'pg-boss';
import { loadConfig } from '../config/env.ts';

/**
 * Lamella's job queue: pg-boss on the application's own PostgreSQL (schema
 * `pgboss`, created and migrated by pg-boss itself), so the web server and
 * any number of worker processes share one queue without another service.
 * One queue object per process, started once.
 */

/** The queues and their delivery rules. */
export const QUEUES = {
  /**
   * Recomputes every condition of one study. "stately": per study at most
   * one job waits and one runs, so a burst of edits coalesces into one
   * waiting job and two workers never compute the same study at once.
   */
  recomputeStudy: {
    name: 'recompute-study',
    policy: 'stately',
    retryLimit: 2,
    retryDelay: 5,
    expireInSeconds: 30 * 60,
  },
} as const satisfies Record<string, PgBoss.Queue>;

export type QueueName = (typeof QUEUES)[keyof typeof QUEUES]['name'];

/** Options of {@link startJobQueue}. */
export interface JobQueueOptions {
  databaseUrl: string;
  /**
   * Run pg-boss maintenance (expiring stuck jobs, archiving) in this
   * process; true for servers and workers, false for a process that only
   * sends jobs.
   */
  supervise: boolean;
}

let running: Promise<PgBoss> | null = null;

async function open(options: JobQueueOptions): Promise<PgBoss> {
  const boss = new PgBoss({
    connectionString: options.databaseUrl,
    application_name: 'lamella-jobs',
    max: 4,
    supervise: options.supervise,
    schedule: false,
  });
  boss.on('error', (error) => console.error('job queue:', error));
  await boss.start();
  // create_queue does nothing when the queue exists, so every process may call it.
  for (const queue of Object.values(QUEUES)) {
    await boss.createQueue(queue.name, { ...queue });
  }
  return boss;
}

/**
 * Starts this process's queue (idempotent: later calls get the same one).
 * @returns the started pg-boss instance.
 */
export function startJobQueue(options: JobQueueOptions): Promise<PgBoss> {
  if (!running) {
    running = open(options);
    running.catch(() => {
      running = null;
    });
  }
  return running;
}

/**
 * The queue of this process, started on first use as a sender only (no
 * maintenance) on DATABASE_URL when nothing started it before — so services
 * can enqueue from scripts and tests as well as from the server.
 */
export function jobQueue(): Promise<PgBoss> {
  return (
    running ??
    startJobQueue({ databaseUrl: loadConfig().databaseUrl, supervise: false })
  );
}

/**
 * Stops this process's queue: workers finish the jobs they hold (up to
 * `timeoutMs`), then the connection pool closes.
 */
export async function stopJobQueue(timeoutMs = 30_000): Promise<void> {
  const current = running;
  running = null;
  if (!current) return;
  const boss = await current.catch(() => null);
  await boss?.stop({ graceful: true, wait: true, timeout: timeoutMs });
}
