import { loadConfig } from './config/env.ts';
import { sequelize } from './db/sequelize.ts';
import { startJobs } from './jobs/recompute-study.worker.ts';

// A worker process: takes recompute jobs from the shared PostgreSQL queue.
// Start as many as the load needs (`node dist/server/worker.js`); each
// computes one study at a time, and no study is computed by two at once.
const config = loadConfig();
await sequelize.authenticate();
const jobs = await startJobs(config, 1);
console.log('Lamella worker is taking recompute jobs.');

async function shutdown(): Promise<void> {
  await jobs.stop();
  await sequelize.close();
  process.exit(0);
}
process.on('SIGINT', () => void shutdown());
process.on('SIGTERM', () => void shutdown());
