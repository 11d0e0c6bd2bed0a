// @ts-check
// `npm run dev`: the API under tsx watch and Vite with hot reload, on the
// same database `npm start` uses.
import { spawn } from 'node:child_process';
import {
  ROOT,
  ensureDatabase,
  ensureNodeModules,
  run,
  startCluster,
} from './bootstrap.mjs';

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
  PUBLIC_URL: 'http://localhost:5173',
};
run('npx', ['--no-install', 'tsx', 'server/db/migrate.ts', 'up'], {
  cwd: ROOT,
  env,
});
run('npx', ['--no-install', 'tsx', 'server/db/seed.ts'], { cwd: ROOT, env });

const children = [
  spawn('npx', ['--no-install', 'tsx', 'watch', 'server/index.ts'], {
    cwd: ROOT,
    env,
    stdio: 'inherit',
  }),
  spawn('npx', ['--no-install', 'vite'], { cwd: ROOT, env, stdio: 'inherit' }),
];
const stop = () => {
  for (const child of children) child.kill('SIGTERM');
  if (stopCluster) stopCluster();
  process.exit(0);
};
process.on('SIGINT', stop);
process.on('SIGTERM', stop);
