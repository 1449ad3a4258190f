import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { loadCorpus } from '../../bench/corpus.js';
import { parseWrittenSpellings, scoreSpelling, spellEvents } from '../../src/spelling/accuracy.js';
import { FollowSpeller } from '../../src/spelling/follow.js';
import { fixedSpeller } from '../../src/spelling/speller.js';

// The open corpus in corpus/mozart: Mozart piano sonatas with their written spellings,
// derived from Craig Stuart Sapp's digital edition of the Alte Mozart-Ausgabe (1878),
// CC BY-NC-SA 4.0 (see its LICENSE.md). Causal spelling is compared with the notes as written.
const corpus = loadCorpus();

function score(make: () => ReturnType<typeof fixedSpeller>): { notes: number; correct: number } {
  let notes = 0;
  let correct = 0;
  for (const m of corpus) {
    const r = scoreSpelling(spellEvents(m.midi.events, make()), parseWrittenSpellings(readFileSync(m.csvPath, 'utf8')));
    notes += r.notes;
    correct += r.correct;
  }
  return { notes, correct };
}

describe('spelling accuracy on the open corpus', () => {
  it('has the corpus: every movement’s onsets match its written spellings', () => {
    expect(corpus.length).toBeGreaterThanOrEqual(60);
    const fixed = score(() => fixedSpeller());
    expect(fixed.notes).toBeGreaterThan(90_000);
    // ../shared/DESIGN.md: a plain Eb..G# window spells about 96% of this corpus.
    expect(fixed.correct / fixed.notes).toBeGreaterThan(0.95);
    expect(fixed.correct / fixed.notes).toBeLessThan(0.97);
  });

  it('follow spells at least 98.5% of the notes as written', () => {
    const follow = score(() => new FollowSpeller());
    expect(follow.correct / follow.notes).toBeGreaterThanOrEqual(0.985);
  });
});
