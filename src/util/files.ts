import { readFileSync, renameSync, writeFileSync } from 'node:fs';
import { UserError } from './errors.js';

/** Reads a file the user named; a failure is one line naming it. */
export function readInputFile(file: string): Uint8Array {
  try {
    return readFileSync(file);
  } catch (error) {
    const code = (error as NodeJS.ErrnoException).code;
    throw new UserError(code === 'ENOENT' ? `${file}: no such file` : `${file}: cannot be read (${code ?? String(error)})`);
  }
}

/** Reads a text file the user named (UTF-8). */
export function readTextFile(file: string): string {
  return new TextDecoder().decode(readInputFile(file));
}

/** Writes through a temporary file and a rename, so a failed write never leaves half a file. */
export function writeOutputFile(file: string, bytes: Uint8Array): void {
  const temporary = `${file}.${process.pid}.tmp`;
  try {
    writeFileSync(temporary, bytes);
    renameSync(temporary, file);
  } catch (error) {
    const code = (error as NodeJS.ErrnoException).code;
    throw new UserError(`${file}: cannot be written (${code ?? String(error)})`);
  }
}
