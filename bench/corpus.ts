import { existsSync, readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { readMidiFile, type MidiFileContent } from '../src/render/smf.js';
import { packageRoot } from '../src/util/package-root.js';

/** The open corpora kept in the repository (corpus/NAME, each with its LICENSE.md). */
export const CORPORA = ['mozart', 'scarlatti', 'bach-suites', 'schuetz', 'corelli'] as const;
export type CorpusName = (typeof CORPORA)[number];

export function corpusDir(name: CorpusName): string {
  return join(packageRoot(), 'corpus', name);
}

/**
 * Mozart piano sonatas, derived from Craig Stuart Sapp's digital edition of the Alte
 * Mozart-Ausgabe, CC BY-NC-SA 4.0 (corpus/mozart/LICENSE.md).
 */
export const CORPUS_DIR = corpusDir('mozart');

export interface Movement {
  readonly name: string;
  readonly midi: MidiFileContent;
  readonly csvPath: string;
}

export function loadCorpus(dir = CORPUS_DIR): Movement[] {
  if (!existsSync(dir)) return [];
  return readdirSync(dir)
    .filter((f) => f.endsWith('.mid'))
    .sort()
    .map((f) => ({
      name: f.replace(/\.mid$/u, ''),
      midi: readMidiFile(readFileSync(join(dir, f)), f),
      csvPath: join(dir, f.replace(/\.mid$/u, '.csv')),
    }));
}
