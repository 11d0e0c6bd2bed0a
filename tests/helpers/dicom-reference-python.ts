import { spawnSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import path from 'node:path';

/** Debian's python, the one with python3-pydicom and python3-numpy. */
export const DEBIAN_PYTHON = '/usr/bin/python3';

/** Where Debian's python3-pydicom keeps its test files. */
export const PYDICOM_TEST_FILES =
  '/usr/lib/python3/dist-packages/pydicom/data/test_files';

const REFERENCE_DIR = path.resolve(import.meta.dirname, '../reference');

/**
 * Throws a clear error when Debian's python, numpy or pydicom is missing: the
 * reference checks must fail rather than skip (the test set-up installs them
 * with `apt-get install -y python3-numpy python3-pydicom`).
 */
export function requireReferencePython(modules: string[]): void {
  if (!existsSync(DEBIAN_PYTHON)) {
    throw new Error(
      `${DEBIAN_PYTHON} is missing; install it with apt-get install -y python3 ${modules.map((m) => `python3-${m}`).join(' ')}.`,
    );
  }
  const probe = spawnSync(
    DEBIAN_PYTHON,
    ['-c', modules.map((m) => `import ${m}`).join('; ')],
    { encoding: 'utf8' },
  );
  if (probe.status !== 0) {
    throw new Error(
      `${DEBIAN_PYTHON} cannot import ${modules.join(', ')}: install with apt-get install -y ${modules.map((m) => `python3-${m}`).join(' ')}. ${probe.stderr.trim()}`,
    );
  }
}

/**
 * Runs a committed reference script from tests/reference with Debian's python
 * and parses its JSON output.
 *
 * @throws Error with the script's stderr when it fails.
 */
export function runReferenceScript<T>(
  script: string,
  args: string[],
  input?: unknown,
): T {
  const result = spawnSync(
    DEBIAN_PYTHON,
    [path.join(REFERENCE_DIR, script), ...args],
    {
      input: input === undefined ? undefined : JSON.stringify(input),
      encoding: 'utf8',
      maxBuffer: 256 * 1024 * 1024,
    },
  );
  if (result.status !== 0) {
    throw new Error(`${script} failed (${result.status}): ${result.stderr}`);
  }
  return JSON.parse(result.stdout) as T;
}
