// How a batch script on a cluster node starts this tiercake: the absolute path of the node
// running now and the absolute path of this checkout's (or installed package's)
// dist/main.js, found from this module's own location (the package root is the nearest
// folder above it with a package.json named tiercake). Absolute paths work on any node
// that sees the same file system, whatever the job's working folder and PATH are.

import { existsSync, readFileSync, realpathSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { InputError } from '../scenario/inputError.js';

function packageRoot(): string | null {
  let dir = dirname(fileURLToPath(import.meta.url));
  for (let k = 0; k < 8; k++) {
    const pkg = join(dir, 'package.json');
    if (existsSync(pkg)) {
      try {
        if ((JSON.parse(readFileSync(pkg, 'utf8')) as { name?: string }).name === 'tiercake') return dir;
      } catch {
        // not ours: keep looking
      }
    }
    const up = dirname(dir);
    if (up === dir) break;
    dir = up;
  }
  return null;
}

/** [node, main.js], both absolute; refuses when dist/main.js has not been built. */
export function toolInvocation(): string[] {
  const root = packageRoot();
  const main = root === null ? null : join(root, 'dist', 'main.js');
  if (main === null || !existsSync(main)) {
    throw new InputError(`${main ?? 'dist/main.js'} is missing; build tiercake first (npm ci && npm run build) so that the batch jobs can run it`);
  }
  return [realpathSync(process.execPath), realpathSync(main)];
}
