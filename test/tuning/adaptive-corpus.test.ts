import { describe, expect, it } from 'vitest';
import { corpusDir, loadCorpus } from '../../bench/corpus.js';
import { runAdaptive, tonicOf, writtenNotes } from '../../bench/adaptive.js';
import { loadTuningPreset } from '../../src/presets/tuning-presets.js';
import { bassDrift, measurePurity } from '../../src/tuning/adaptive/index.js';

// The floors of the bench's figures, on the open Schütz corpus in corpus/schuetz (CC BY-NC-SA,
// see its LICENSE.md), played with its written spellings and the files' own timing. The pure
// sizes the measure compares against are the just ratios (common practice, no source).
describe('adaptive just intonation on the Schütz corpus (default setting)', () => {
  const pieces = loadCorpus(corpusDir('schuetz')).map(writtenNotes).filter((n) => n.length > 0);
  const table = loadTuningPreset('just-adaptive').tuning;
  const runs = pieces.map((notes) => ({ notes, tonic: tonicOf(notes)!, run: runAdaptive(notes, table, {}, tonicOf(notes)) }));

  it('has the corpus', () => {
    expect(pieces.length).toBeGreaterThanOrEqual(50);
  });

  it('sounds its fifths, thirds and sixths within 0.5 cent of pure on average, and no note moves', () => {
    const purity = measurePurity(runs.flatMap((r) => r.run.events));
    expect(purity.all.count).toBeGreaterThan(40_000);
    expect(purity.all.meanAbs).toBeLessThanOrEqual(0.5);
    expect(purity.moved).toBe(0);
    expect(runs.reduce((n, r) => n + r.run.movedInTuner, 0)).toBe(0);
  });

  it('keeps every piece’s tonic within 3 cents from its first to its last sounding in the bass', () => {
    for (const { run, tonic } of runs) {
      const drift = bassDrift(run.events, tonic.fifths);
      if (drift !== undefined) expect(Math.abs(drift)).toBeLessThanOrEqual(3);
    }
  });
});
