// The follow speller in every key: each movement of each corpus transposed by every semitone
// (0…11), its written spellings moved by the same interval, named so that the piece's mean
// position on the line of fifths stays within six fifths of D (keys from G♭/E♭ minor to F♯/D♯
// minor). Prints, per corpus, the accuracy at each transposition, the weakest one and the accuracy
// by the pieces' mean position, with no key given and with the key declared (from bench/run.ts, or
// by hand: node dist/bench/every-key.js [corpus,...] ['{"param":value}'] [declared|undeclared]).
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { DEFAULT_FOLLOW, FollowSpeller, type FollowParameters, type Key } from '../src/spelling/follow.js';
import { parseWrittenSpellings, scoreSpelling, spellEvents } from './accuracy.js';
import { CORPORA, corpusDir, loadCorpus, type CorpusName, type Movement } from './corpus.js';
import { transpose } from './transpose.js';

/**
 * The key a player would declare for a piece: the key follow finds in its untransposed form after
 * its first 24 notes (a stand-in for the written key, which the corpora do not give).
 */
function startingKey(m: Movement): Key {
  const speller = new FollowSpeller(DEFAULT_FOLLOW);
  const events = m.midi.events.filter((e) => ((e.data[0] ?? 0) & 0xf0) === 0x90 && (e.data[2] ?? 0) > 0).slice(0, 24);
  spellEvents(events, speller);
  const k = speller.currentKey();
  return { tonic: k.tonic.fifths, mode: k.mode === 'minor' ? 'minor' : 'major' };
}

const pct = (c: number, n: number): string => ((100 * c) / n).toFixed(2);

/** Prints the figures of each corpus in `only` (all by default), with the key declared or not. */
export function benchEveryKey(declared: boolean, only: readonly string[] = CORPORA, change: Partial<FollowParameters> = {}): void {
  process.stdout.write(`\nfollow in every key (each movement moved by 0…11 semitones), ${declared ? 'the key declared' : 'no key given'}\n`);
  for (const name of CORPORA) {
    if (!only.includes(name)) continue;
    const movements: Movement[] = loadCorpus(corpusDir(name as CorpusName));
    const written = movements.map((m) => parseWrittenSpellings(readFileSync(m.csvPath, 'utf8')));
    const starts = movements.map(startingKey);
    const figures: string[] = [];
    const byMean = new Map<number, [number, number]>();
    let worst = { semitones: 0, value: 100 };
    for (let semitones = 0; semitones < 12; semitones++) {
      let notes = 0;
      let correct = 0;
      movements.forEach((m, i) => {
        const t = transpose(m.midi, written[i]!, semitones) ?? transpose(m.midi, written[i]!, semitones - 12);
        if (t === undefined) return;
        const initialKey = declared ? { tonic: starts[i]!.tonic + t.shift, mode: starts[i]!.mode } : undefined;
        const r = scoreSpelling(spellEvents(t.events, new FollowSpeller({ ...DEFAULT_FOLLOW, ...change, initialKey })), t.written);
        notes += r.notes;
        correct += r.correct;
        const bin = Math.round(t.mean);
        const b = byMean.get(bin) ?? [0, 0];
        byMean.set(bin, [b[0] + r.correct, b[1] + r.notes]);
      });
      const value = (100 * correct) / notes;
      if (value < worst.value) worst = { semitones, value };
      figures.push(`+${semitones} ${pct(correct, notes)}`);
    }
    const bins = [...byMean.entries()].sort((a, b) => a[0] - b[0]).map(([bin, [c, n]]) => `${bin}: ${pct(c, n)}`);
    process.stdout.write(`  ${name.padEnd(12)} worst +${worst.semitones} ${worst.value.toFixed(2)}   ${figures.join('  ')}\n    by mean fifths position: ${bins.join('  ')}\n`);
  }
}

if (process.argv[1] === fileURLToPath(import.meta.url)) {
  const only = process.argv[2]?.split(',') ?? CORPORA;
  const change = JSON.parse(process.argv[3] ?? '{}') as Partial<FollowParameters>;
  const which = process.argv[4];
  if (which !== 'declared') benchEveryKey(false, only, change);
  if (which !== 'undeclared') benchEveryKey(true, only, change);
}
