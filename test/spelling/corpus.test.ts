import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { CORPORA, corpusDir, loadCorpus, type CorpusName } from '../../bench/corpus.js';
import { parseWrittenSpellings, scoreSpelling, spellEvents } from '../../bench/accuracy.js';
import { FollowSpeller } from '../../src/spelling/follow.js';
import { fixedSpeller, type Speller } from '../../src/spelling/speller.js';

// The open corpora in corpus/ (each with its LICENSE.md; CC BY-NC-SA 4.0): Mozart piano sonatas
// (from Craig Stuart Sapp's digital edition of the Alte Mozart-Ausgabe), Scarlatti sonatas, Bach's
// English and French suites, Schütz's Kleine geistliche Konzerte and Corelli's trio sonatas, each
// with the notes' written spellings. Causal spelling is compared with the notes as written.

/**
 * What `follow` reaches on each corpus with its defaults (printed by `npm run bench`, both halves):
 * the floors asserted here. The goal is 99.5% everywhere; Mozart (99.16%) falls short of it, and
 * its floor says so.
 */
const FOLLOW_FLOOR: Readonly<Record<CorpusName, number>> = {
  mozart: 0.9915,
  scarlatti: 0.995,
  'bach-suites': 0.997,
  schuetz: 0.999,
  corelli: 0.999,
};

/** Notes per corpus (corpus/README.md and the issue that added them). */
const NOTES: Readonly<Record<CorpusName, number>> = {
  mozart: 96_635,
  scarlatti: 67_597,
  'bach-suites': 56_301,
  schuetz: 48_039,
  corelli: 68_143,
};

/**
 * The fixed window's figures as the corpora were described: about 96% of the Mozart corpus
 * (../shared/DESIGN.md, recorded in the README) and 99.89% of the Schütz corpus (the issue that
 * added the early corpora).
 */
const FIXED_RANGE: Partial<Record<CorpusName, readonly [number, number]>> = {
  mozart: [0.95, 0.97],
  schuetz: [0.998, 0.9995],
};

describe('spelling accuracy on the open corpora', () => {
  for (const name of CORPORA) {
    it(`${name}: follow spells at least ${(100 * FOLLOW_FLOOR[name]).toFixed(2)}% as written, and no less than the fixed Eb..G# window`, () => {
      const corpus = loadCorpus(corpusDir(name));
      const score = (make: () => Speller) => {
        let notes = 0;
        let correct = 0;
        for (const m of corpus) {
          const r = scoreSpelling(spellEvents(m.midi.events, make()), parseWrittenSpellings(readFileSync(m.csvPath, 'utf8')));
          notes += r.notes;
          correct += r.correct;
        }
        return { notes, correct };
      };
      const follow = score(() => new FollowSpeller());
      const fixed = score(() => fixedSpeller());
      // Every onset of every movement matched its written spelling: the whole corpus is scored.
      expect(follow.notes).toBe(NOTES[name]);
      expect(fixed.notes).toBe(NOTES[name]);
      expect(follow.correct / follow.notes).toBeGreaterThanOrEqual(FOLLOW_FLOOR[name]);
      expect(follow.correct).toBeGreaterThanOrEqual(fixed.correct);
      const range = FIXED_RANGE[name];
      if (range) {
        expect(fixed.correct / fixed.notes).toBeGreaterThan(range[0]);
        expect(fixed.correct / fixed.notes).toBeLessThan(range[1]);
      }
    });
  }
});
