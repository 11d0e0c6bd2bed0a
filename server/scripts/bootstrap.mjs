// @ts-check
// Machine set-up shared by `npm start` and `npm test`. This file runs before
// node_modules exists, so it may use Node's built-in modules only; that is
// also why it is plain JavaScript checked by `// @ts-check` rather than
// TypeScript.
import { spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import {
  existsSync,
  mkdirSync,
  readdirSync,
  statSync,
  chownSync,
  chmodSync,
} from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

export const ROOT = resolve(dirname(fileURLToPath(import.meta.url)), '../..');
export const PGPORT = Number(process.env.PGPORT ?? 54329);
const isRoot = typeof process.getuid === 'function' && process.getuid() === 0;

/** Prints one set-up step so a new user sees where time goes. */
export function step(message) {
  console.log(`\u001b[36m[lamella]\u001b[0m ${message}`);
}

/** Runs a command, streaming its output; exits the script if it fails. */
export function run(command, args, options = {}) {
  const result = spawnSync(command, args, { stdio: 'inherit', ...options });
  if (result.error) throw result.error;
  if (result.status !== 0) {
    throw new Error(`${command} ${args.join(' ')} failed (${result.status})`);
  }
}

function runQuiet(command, args, options = {}) {
  return spawnSync(command, args, { encoding: 'utf8', ...options });
}

/** Installs node_modules with `npm ci` when missing or older than the lock. */
export function ensureNodeModules() {
  const lock = join(ROOT, 'package-lock.json');
  const marker = join(ROOT, 'node_modules', '.package-lock.json');
  if (
    existsSync(marker) &&
    statSync(marker).mtimeMs >= statSync(lock).mtimeMs
  ) {
    return;
  }
  step('installing npm packages (npm ci)');
  run('npm', ['ci', '--no-audit', '--no-fund'], { cwd: ROOT });
}

let aptUpdated = false;

/** Installs the Debian packages that are missing, when running as root. */
export function ensureDebianPackages(packages, why) {
  const missing = packages.filter(
    (name) =>
      !/install ok installed/.test(
        runQuiet('dpkg-query', ['-W', '-f=${Status}', name]).stdout ?? '',
      ),
  );
  if (missing.length === 0) return;
  if (!isRoot) {
    throw new Error(
      `${why} needs the Debian packages ${missing.join(', ')}; install them with: sudo apt-get install -y ${missing.join(' ')}`,
    );
  }
  const env = { ...process.env, DEBIAN_FRONTEND: 'noninteractive' };
  if (!aptUpdated) {
    step('apt-get update');
    run('apt-get', ['update'], { env });
    aptUpdated = true;
  }
  step(`apt-get install -y ${missing.join(' ')} (${why})`);
  run('apt-get', ['install', '-y', '--no-install-recommends', ...missing], {
    env,
  });
}

function postgresBin() {
  const base = '/usr/lib/postgresql';
  if (!existsSync(base)) return null;
  const versions = readdirSync(base)
    .filter((v) => existsSync(join(base, v, 'bin', 'initdb')))
    .sort((a, b) => Number(a) - Number(b));
  return versions.length
    ? join(base, versions[versions.length - 1], 'bin')
    : null;
}

/** Finds or installs the PostgreSQL server binaries. */
export function ensurePostgresServer() {
  let bin = postgresBin();
  if (!bin) {
    ensureDebianPackages(['postgresql'], 'the database');
    bin = postgresBin();
  }
  if (!bin)
    throw new Error('PostgreSQL server binaries not found after install');
  return bin;
}

function reachableByPostgres(folder) {
  const r = runQuiet('runuser', ['-u', 'postgres', '--', 'test', '-x', folder]);
  return r.status === 0;
}

/**
 * The cluster's data folder: `.pgdata` in the checkout, or a folder under
 * /tmp named after the checkout when the postgres user cannot enter it.
 */
export function dataFolder() {
  if (process.env.PGDATA) return process.env.PGDATA;
  const local = join(ROOT, '.pgdata');
  if (!isRoot || reachableByPostgres(ROOT)) return local;
  const tag = createHash('sha256').update(ROOT).digest('hex').slice(0, 10);
  return `/tmp/lamella-pgdata-${tag}`;
}

function asPostgres(bin, args) {
  return isRoot
    ? ['runuser', ['-u', 'postgres', '--', bin, ...args]]
    : [bin, args];
}

/**
 * Initialises (once) and starts Lamella's own PostgreSQL cluster on
 * 127.0.0.1:PGPORT. Returns a function that stops it, or null when it was
 * already running (then we leave it running).
 */
export function startCluster() {
  const bin = ensurePostgresServer();
  const pgdata = dataFolder();
  if (!existsSync(join(pgdata, 'PG_VERSION'))) {
    step(`initialising PostgreSQL in ${pgdata}`);
    mkdirSync(pgdata, { recursive: true });
    if (isRoot) {
      const uid = Number(runQuiet('id', ['-u', 'postgres']).stdout.trim());
      const gid = Number(runQuiet('id', ['-g', 'postgres']).stdout.trim());
      chownSync(pgdata, uid, gid);
    }
    chmodSync(pgdata, 0o700);
    const [cmd, args] = asPostgres(join(bin, 'initdb'), [
      '-D',
      pgdata,
      '-U',
      'postgres',
      '--auth=trust',
      '-E',
      'UTF8',
      '--locale=C.UTF-8',
    ]);
    const init = runQuiet(cmd, args);
    if (init.status !== 0) {
      throw new Error(`initdb failed:\n${init.stdout}\n${init.stderr}`);
    }
  }
  const [scmd, sargs] = asPostgres(join(bin, 'pg_ctl'), [
    '-D',
    pgdata,
    'status',
  ]);
  if (runQuiet(scmd, sargs).status === 0) {
    step(`PostgreSQL already running on 127.0.0.1:${PGPORT}`);
    return null;
  }
  step(`starting PostgreSQL on 127.0.0.1:${PGPORT}`);
  const [cmd, args] = asPostgres(join(bin, 'pg_ctl'), [
    '-D',
    pgdata,
    '-l',
    join(pgdata, 'server.log'),
    '-w',
    '-t',
    '60',
    '-o',
    `-p ${PGPORT} -c listen_addresses=127.0.0.1 -k ${pgdata}`,
    'start',
  ]);
  const started = runQuiet(cmd, args);
  if (started.status !== 0) {
    throw new Error(
      `PostgreSQL did not start:\n${started.stdout}${started.stderr}`,
    );
  }
  return () => {
    const [c, a] = asPostgres(join(bin, 'pg_ctl'), [
      '-D',
      pgdata,
      '-m',
      'fast',
      '-w',
      'stop',
    ]);
    runQuiet(c, a);
    step('PostgreSQL stopped');
  };
}

function psql(bin, database, sql) {
  return runQuiet(join(bin, 'psql'), [
    '-h',
    '127.0.0.1',
    '-p',
    String(PGPORT),
    '-U',
    'postgres',
    '-d',
    database,
    '-v',
    'ON_ERROR_STOP=1',
    '-tAc',
    sql,
  ]);
}

/** Creates the database when missing (or anew with `fresh`); returns its URL. */
export function ensureDatabase(name, { fresh = false } = {}) {
  const bin = ensurePostgresServer();
  if (!/^[a-z_][a-z0-9_]*$/.test(name))
    throw new Error(`bad database name ${name}`);
  if (fresh) {
    const dropped = psql(
      bin,
      'postgres',
      `DROP DATABASE IF EXISTS ${name} WITH (FORCE)`,
    );
    if (dropped.status !== 0) throw new Error(dropped.stderr);
  }
  const exists = psql(
    bin,
    'postgres',
    `SELECT 1 FROM pg_database WHERE datname='${name}'`,
  );
  if (exists.stdout.trim() !== '1') {
    const created = psql(bin, 'postgres', `CREATE DATABASE ${name}`);
    if (created.status !== 0) throw new Error(created.stderr);
  }
  return `postgres://postgres@127.0.0.1:${PGPORT}/${name}`;
}

/** True when any file under `folders` is newer than `target`. */
export function isStale(target, folders) {
  if (!existsSync(target)) return true;
  const built = statSync(target).mtimeMs;
  const newer = (path) => {
    const info = statSync(path);
    if (info.isDirectory()) {
      return readdirSync(path).some((name) => newer(join(path, name)));
    }
    return info.mtimeMs > built;
  };
  return folders
    .map((f) => join(ROOT, f))
    .filter(existsSync)
    .some(newer);
}
