import { spawnSync } from 'node:child_process';
import path from 'node:path';

const ROOT = path.resolve(import.meta.dirname, '../..');

/** Output of one run of the real `lamella` bin. */
export interface CliRun {
  status: number | null;
  stdout: string;
  stderr: string;
}

/** Runs `node server/scripts/lamella.mjs …` from the project root. */
export function runLamella(args: string[]): CliRun {
  const result = spawnSync(
    process.execPath,
    ['server/scripts/lamella.mjs', ...args],
    {
      cwd: ROOT,
      encoding: 'utf8',
      timeout: 60_000,
    },
  );
  return {
    status: result.status,
    stdout: result.stdout,
    stderr: result.stderr,
  };
}
