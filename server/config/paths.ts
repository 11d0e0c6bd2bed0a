import { existsSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

function findProjectRoot(start: string): string {
  let dir = start;
  while (!existsSync(path.join(dir, 'package.json'))) {
    const parent = path.dirname(dir);
    if (parent === dir) throw new Error(`no package.json above ${start}`);
    dir = parent;
  }
  return dir;
}

/**
 * The checkout's root, found the same way whether this runs from `server/`
 * under tsx or from `dist/server/` after compilation.
 */
export const PROJECT_ROOT = findProjectRoot(
  path.dirname(fileURLToPath(import.meta.url)),
);

/** Resolves a configured folder (e.g. UPLOADS_DIR) against the root. */
export const fromRoot = (folder: string): string =>
  path.resolve(PROJECT_ROOT, folder);
