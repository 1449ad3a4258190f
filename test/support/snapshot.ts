import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join, relative } from 'node:path';
import { expect } from 'vitest';

/** Every file below `dir`, by relative path, with its bytes. */
export function snapshot(dir: string): Map<string, Buffer> {
  const files = new Map<string, Buffer>();
  const walk = (d: string): void => {
    for (const name of readdirSync(d)) {
      const path = join(d, name);
      if (statSync(path).isDirectory()) walk(path);
      else files.set(relative(dir, path), readFileSync(path));
    }
  };
  walk(dir);
  return files;
}

/** The folder holds exactly the files it held, byte for byte: nothing added (no temporary file left), nothing removed or changed. */
export function expectUntouched(dir: string, before: Map<string, Buffer>): void {
  const after = snapshot(dir);
  expect([...after.keys()].sort()).toEqual([...before.keys()].sort());
  for (const [name, bytes] of before) expect(after.get(name)?.equals(bytes), name).toBe(true);
}
