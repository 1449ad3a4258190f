import { readFileSync } from 'node:fs';
import { DEFAULT_WINDOW } from '../src/pitch/index.js';
import { parseWrittenSpellings, scoreSpelling, spellEvents } from '../src/spelling/accuracy.js';
import { DEFAULT_FOLLOW, FollowSpeller, type FollowParameters } from '../src/spelling/follow.js';
import { fixedSpeller, type Speller } from '../src/spelling/speller.js';
import { loadCorpus, type Movement } from './corpus.js';
import { heading } from './timing.js';

export interface CorpusScore {
  readonly perMovement: Array<{ name: string; notes: number; correct: number }>;
  readonly notes: number;
  readonly correct: number;
  readonly confusions: Map<string, number>;
}

export function scoreCorpus(corpus: readonly Movement[], make: () => Speller): CorpusScore {
  const perMovement: CorpusScore['perMovement'] = [];
  const confusions = new Map<string, number>();
  let notes = 0;
  let correct = 0;
  for (const m of corpus) {
    const result = scoreSpelling(spellEvents(m.midi.events, make()), parseWrittenSpellings(readFileSync(m.csvPath, 'utf8')));
    perMovement.push({ name: m.name, notes: result.notes, correct: result.correct });
    notes += result.notes;
    correct += result.correct;
    for (const [k, v] of result.confusions) confusions.set(k, (confusions.get(k) ?? 0) + v);
  }
  return { perMovement, notes, correct, confusions };
}

const pct = (c: number, n: number): string => `${((100 * c) / n).toFixed(2)}%`;

/** Note accuracy of the follow speller on the corpus, per movement and overall, with fixed Eb..G# as the yardstick. */
export function benchSpelling(parameters: FollowParameters = DEFAULT_FOLLOW): void {
  const corpus = loadCorpus();
  if (corpus.length === 0) {
    process.stdout.write('\n(spelling bench skipped: corpus/mozart not found)\n');
    return;
  }
  heading('spelling accuracy on the Mozart corpus (notes spelled as written)');
  const follow = scoreCorpus(corpus, () => new FollowSpeller(parameters));
  const fixed = scoreCorpus(corpus, () => fixedSpeller(DEFAULT_WINDOW));
  process.stdout.write(`${'movement'.padEnd(14)}${'notes'.padStart(7)}${'follow'.padStart(9)}${'Eb..G#'.padStart(9)}\n`);
  follow.perMovement.forEach((m, i) => {
    const f = fixed.perMovement[i]!;
    process.stdout.write(`${m.name.padEnd(14)}${String(m.notes).padStart(7)}${pct(m.correct, m.notes).padStart(9)}${pct(f.correct, f.notes).padStart(9)}\n`);
  });
  process.stdout.write(`${'overall'.padEnd(14)}${String(follow.notes).padStart(7)}${pct(follow.correct, follow.notes).padStart(9)}${pct(fixed.correct, fixed.notes).padStart(9)}\n`);
  // The parameters were chosen on the whole corpus; as a check against fitting, each half on its own.
  for (const [label, half] of [['sonatas 1-9', corpus.filter((m) => Number(m.name.slice(6, 8)) <= 9)], ['sonatas 10-', corpus.filter((m) => Number(m.name.slice(6, 8)) >= 10)]] as const) {
    const f = scoreCorpus(half, () => new FollowSpeller(parameters));
    process.stdout.write(`${label.padEnd(14)}${String(f.notes).padStart(7)}${pct(f.correct, f.notes).padStart(9)}\n`);
  }
  const top = [...follow.confusions.entries()].sort((a, b) => b[1] - a[1]).slice(0, 12);
  process.stdout.write(`follow's commonest errors (written→played): ${top.map(([k, v]) => `${k} ${v}`).join(', ')}\n`);
}
