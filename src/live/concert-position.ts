import { existsSync, statSync } from 'node:fs';
import { basename, dirname, join, resolve } from 'node:path';
import { UserError } from '../util/errors.js';
import { readTextFile, writeOutputFile } from '../util/files.js';

/** Where a concert is: the piece, by place and title (a title that no longer matches is not resumed). */
export interface ConcertPlace {
  readonly index: number;
  readonly title: string;
}

/** What the file says first, so diesis knows the file is its own (and never replaces another). */
const MARK = 'concert position';

/** The file beside the programme where diesis keeps the concert's place: `.concert.json.position`. */
export function positionFileOf(programmeFile: string): string {
  return join(dirname(resolve(programmeFile)), `.${basename(programmeFile)}.position`);
}

/** The place kept for a programme, or undefined when there is none (or the file is not diesis's, or is damaged). */
export function readConcertPlace(programmeFile: string): ConcertPlace | undefined {
  const file = positionFileOf(programmeFile);
  if (!existsSync(file) || !statSync(file).isFile()) return undefined;
  try {
    const value = JSON.parse(readTextFile(file, 4096)) as Record<string, unknown>;
    if (value.diesis !== MARK || typeof value.piece !== 'number' || !Number.isInteger(value.piece) || typeof value.title !== 'string') return undefined;
    return { index: value.piece - 1, title: value.title };
  } catch (error) {
    if (error instanceof UserError || error instanceof SyntaxError) return undefined;
    throw error;
  }
}

/**
 * Keeps the concert's place: written whole through a temporary file and a rename, so a crash
 * leaves the old place or the new one, never half a file; a file there that diesis did not write
 * is never replaced (the write is refused with one line).
 */
export function writeConcertPlace(programmeFile: string, place: ConcertPlace, programmeFiles: readonly string[]): void {
  const text = `${JSON.stringify({ diesis: MARK, programme: basename(programmeFile), piece: place.index + 1, title: place.title })}\n`;
  writeOutputFile('concert position', positionFileOf(programmeFile), 'position', new TextEncoder().encode(text), programmeFiles);
}

/** Where to start: `--resume`, `--from-start`, on a terminal the player's answer, elsewhere the first piece with a word on how to resume. */
export type ResumeChoice = 'resume' | 'from-start' | 'ask' | 'tell';

/** The piece to start at (0-based) for a kept place and a choice; `ask` answers through `answer`. */
export async function startingPiece(
  kept: ConcertPlace | undefined,
  titles: readonly string[],
  choice: ResumeChoice,
  answer: (question: string) => Promise<boolean>,
): Promise<{ index: number; note: string | undefined }> {
  if (!kept) return { index: 0, note: undefined };
  const fits = kept.index >= 0 && kept.index < titles.length && titles[kept.index] === kept.title;
  if (!fits) return { index: 0, note: `the concert was at "${kept.title}", which is no longer piece ${kept.index + 1} of this programme: starting at the first piece` };
  if (kept.index === 0 || choice === 'from-start') return { index: 0, note: undefined };
  const where = `piece ${kept.index + 1} of ${titles.length}, "${kept.title}"`;
  if (choice === 'resume') return { index: kept.index, note: `resuming at ${where}` };
  if (choice === 'tell') return { index: 0, note: `the concert was at ${where}: starting at the first piece (give --resume to continue there)` };
  return (await answer(`The concert was at ${where}. Resume there? [Y/n] `))
    ? { index: kept.index, note: `resuming at ${where}` }
    : { index: 0, note: undefined };
}
