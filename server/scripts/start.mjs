// @ts-check
// `npm start`: install what is missing, start Lamella's own PostgreSQL,
// migrate, seed the demo, build when sources changed, and serve. Ctrl-C stops
// everything this script started, the database included.
import { spawn } from 'node:child_process';
import { join } from 'node:path';
import {
  ROOT,
  ensureDatabase,
  ensureNodeModules,
  isStale,
  run,
  startCluster,
  step,
} from './bootstrap.mjs';

const started = Date.now();
ensureNodeModules();

let stopCluster = null;
let databaseUrl = process.env.DATABASE_URL;
if (!databaseUrl) {
  stopCluster = startCluster();
  databaseUrl = ensureDatabase('lamella');
}
const env = {
  ...process.env,
  DATABASE_URL: databaseUrl,
  NODE_ENV: 'production',
};

const stopAll = (code) => {
  if (stopCluster) stopCluster();
  process.exit(code);
};

try {
  if (
    isStale(join(ROOT, 'dist', 'server', 'index.js'), [
      'src',
      'server',
      'shared',
      'index.html',
      'package-lock.json',
    ])
  ) {
    step('building client and server');
    run('npm', ['run', 'build', '--silent'], { cwd: ROOT });
  }
  step('migrating the database');
  run('node', ['dist/server/db/migrate.js', 'up'], { cwd: ROOT, env });
  step('seeding the demo hospital (once)');
  run('node', ['dist/server/db/seed.js'], { cwd: ROOT, env });
} catch (error) {
  console.error(String(error instanceof Error ? error.message : error));
  stopAll(1);
}

step(`ready to serve after ${((Date.now() - started) / 1000).toFixed(1)} s`);
const server = spawn('node', ['dist/server/index.js'], {
  cwd: ROOT,
  env,
  stdio: 'inherit',
});
let stopping = false;
for (const signal of /** @type {const} */ (['SIGINT', 'SIGTERM'])) {
  process.on(signal, () => {
    if (stopping) return;
    stopping = true;
    step(`stopping (${signal})`);
    server.kill('SIGTERM');
  });
}
server.on('exit', (code) => stopAll(stopping ? 0 : (code ?? 1)));
