import { existsSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

/** The package's own folder: the nearest ancestor of this module holding package.json (under src/ in tests, dist/ when built). */
export function packageRoot(): string {
  let dir = dirname(fileURLToPath(import.meta.url));
  while (!existsSync(join(dir, 'package.json'))) {
    const parent = dirname(dir);
    if (parent === dir) throw new Error('diesis: cannot find the package folder');
    dir = parent;
  }
  return dir;
}
