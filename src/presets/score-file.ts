import { extname } from 'node:path';
import { UserError } from '../util/errors.js';
import { readInputFile } from '../util/files.js';
import { readMusicXml } from '../score/musicxml.js';
import type { Score } from '../score/score.js';

const EXTENSIONS = new Set(['.musicxml', '.xml', '.mxl']);

/** Reads a MusicXML score file (`.musicxml`, `.xml`, or compressed `.mxl`); every problem is one line naming the file. */
export function readScoreFile(file: string): Score {
  const extension = extname(file).toLowerCase();
  if (!EXTENSIONS.has(extension)) throw new UserError(`${file}: a score must be MusicXML (.musicxml, .xml or compressed .mxl); export it from the notation program as MusicXML`);
  const score = readMusicXml(readInputFile(file), file);
  if (score.groups.length === 0) throw new UserError(`${file}: the score has no notes to follow`);
  return score;
}

