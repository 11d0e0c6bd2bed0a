// @ts-check
// `npm test`: the same machine set-up as `npm start`, a freshly migrated test
// database, then typecheck, lint, build and every vitest file (unit, API and
// browser). Prints one closing line "N passed, N failed".
import { existsSync, mkdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import {
  ROOT,
  ensureDatabase,
  ensureDebianPackages,
  ensureNodeModules,
  run,
  startCluster,
  step,
} from './bootstrap.mjs';

/** Debian packages the tests use as outside references or real parts. */
const TEST_PACKAGES = [
  'chromium',
  'dcmtk',
  'python3-pydicom',
  'python3-numpy',
  'python3-xraylib',
  'poppler-utils',
];

const timings = [];
const timed = (name, fn) => {
  const t0 = Date.now();
  step(name);
  fn();
  timings.push(`${name} ${((Date.now() - t0) / 1000).toFixed(1)} s`);
};

const started = Date.now();
let stopCluster = null;
let exitCode = 0;
try {
  timed('npm packages', ensureNodeModules);
  timed('Debian packages for tests', () =>
    ensureDebianPackages(TEST_PACKAGES, 'the test suite'),
  );
  let databaseUrl = process.env.TEST_DATABASE_URL;
  timed('test database', () => {
    if (!databaseUrl) {
      stopCluster = startCluster();
      databaseUrl = ensureDatabase(
        process.env.LAMELLA_TEST_DB ?? 'lamella_test',
        {
          fresh: true,
        },
      );
    }
  });
  const env = {
    ...process.env,
    DATABASE_URL: databaseUrl,
    NODE_ENV: 'test',
    TZ: 'UTC',
    UPLOADS_DIR: join('test-output', 'uploads'),
  };
  const npx = (args) =>
    run('npx', ['--no-install', ...args], { cwd: ROOT, env });
  timed('migrate', () => npx(['tsx', 'server/db/migrate.ts', 'up']));
  timed('typecheck', () => npx(['tsc', '-b']));
  timed('lint', () => {
    npx(['eslint', '.']);
    npx(['prettier', '--check', '.']);
  });
  timed('build client', () => npx(['vite', 'build', '--logLevel', 'warn']));
  mkdirSync(join(ROOT, 'test-output'), { recursive: true });
  const report = join(ROOT, 'test-output', 'vitest.json');
  let vitestError = null;
  try {
    timed('vitest', () =>
      npx([
        'vitest',
        'run',
        '--reporter=default',
        '--reporter=json',
        `--outputFile.json=${report}`,
      ]),
    );
  } catch (error) {
    vitestError = error;
  }
  if (existsSync(report)) {
    const r = JSON.parse(readFileSync(report, 'utf8'));
    const skipped = r.numPendingTests + (r.numTodoTests ?? 0);
    console.log(
      `\n${r.numPassedTests} passed, ${r.numFailedTests} failed, ${skipped} skipped`,
    );
    if (r.numTotalTests === 0) vitestError = new Error('no test ran');
  }
  if (vitestError) throw vitestError;
} catch (error) {
  console.error(String(error instanceof Error ? error.message : error));
  exitCode = 1;
} finally {
  if (stopCluster) stopCluster();
  console.log(
    `${timings.join(' · ')} · total ${((Date.now() - started) / 1000).toFixed(1)} s`,
  );
  process.exit(exitCode);
}
