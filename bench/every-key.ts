// The follow speller in every key: each movement of each corpus transposed by every semitone
// (0…11), its key named as follow names keys (within seven accidentals, nearest its naming centre)
// and its written spellings moved by the same interval. Prints, per corpus, the accuracy at each
// transposition, the weakest one (also with either enharmonic name of the whole piece accepted)
// and the accuracy by key signature, with no key given and with the key declared (from
// bench/run.ts, or by hand: node dist/bench/every-key.js [corpus,...] ['{"param":value}']
// [declared|undeclared]).
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { DEFAULT_FOLLOW, FollowSpeller, signatureOf, type FollowParameters, type Key } from '../src/spelling/follow.js';
import { tonicNearest } from '../src/spelling/key-names.js';
import { mod } from '../src/util/errors.js';
import { parseWrittenSpellings, scoreSpelling, spellEvents } from './accuracy.js';
import { CORPORA, corpusDir, loadCorpus, type CorpusName, type Movement } from './corpus.js';
import { transpose, type Transposed } from './transpose.js';

/**
 * The key a player would declare for a piece: the key follow finds in its untransposed form after
 * its first 24 notes (a stand-in for the written key, which the corpora do not give).
 */
export function startingKey(m: Movement): Key {
  const speller = new FollowSpeller(DEFAULT_FOLLOW);
  const events = m.midi.events.filter((e) => ((e.data[0] ?? 0) & 0xf0) === 0x90 && (e.data[2] ?? 0) > 0).slice(0, 24);
  spellEvents(events, speller);
  const k = speller.currentKey() ?? { tonic: { fifths: 0 }, mode: 'major' }; // C major if 24 notes named no key
  return { tonic: k.tonic.fifths, mode: k.mode === 'minor' ? 'minor' : 'major' };
}

/** The key `start` moved up by `semitones`, named within seven accidentals nearest `centre` (as the follow speller names a key it finds). */
export function namedKey(start: Key, semitones: number, centre: number = DEFAULT_FOLLOW.namingCentre): Key {
  return { tonic: tonicNearest({ tonic: start.tonic + mod(7 * semitones, 12), mode: start.mode }, centre), mode: start.mode };
}

/**
 * A movement moved so that its starting key, named as `namedKey` names it, has `signature` sharps
 * (+) or flats (−), with that key; undefined where no transposition names it so (A♯ minor is named
 * B♭ minor) or a note would leave 0…127.
 */
export function movedToSignature(m: Movement, written: ReadonlyArray<{ tick: number; key: number; spelling: string }>, signature: number): { moved: Transposed; key: Key } | undefined {
  const start = startingKey(m);
  for (let semitones = 0; semitones < 12; semitones++) {
    const key = namedKey(start, semitones);
    if (signatureOf(key) + 1 !== signature) continue;
    const moved = transpose(m.midi, written, semitones, key.tonic - start.tonic) ?? transpose(m.midi, written, semitones - 12, key.tonic - start.tonic);
    return moved && { moved, key };
  }
  return undefined;
}

const pct = (c: number, n: number): string => ((100 * c) / n).toFixed(2);

/** Prints the figures of each corpus in `only` (all by default), with the key declared or not. */
export function benchEveryKey(declared: boolean, only: readonly string[] = CORPORA, change: Partial<FollowParameters> = {}): void {
  // Each piece's key moved to each of the twelve, named within seven sharps or flats as the speller
  // names a key nobody declared (nearest its naming centre: F♯ and C♯ major, D♯ and G♯ minor,
  // A♭ major and B♭ minor, as Baroque keyboard music names them).
  const centre = change.namingCentre ?? DEFAULT_FOLLOW.namingCentre;
  process.stdout.write(`\nfollow in every key (each movement moved by 0…11 semitones), ${declared ? 'the key declared' : 'no key given'}\n`);
  for (const name of CORPORA) {
    if (!only.includes(name)) continue;
    const movements: Movement[] = loadCorpus(corpusDir(name as CorpusName));
    const written = movements.map((m) => parseWrittenSpellings(readFileSync(m.csvPath, 'utf8')));
    const starts = movements.map(startingKey);
    const figures: string[] = [];
    const bySignature = new Map<number, [number, number]>();
    let worst = { semitones: 0, value: 100 };
    let eitherWorst = 100;
    for (let semitones = 0; semitones < 12; semitones++) {
      let notes = 0;
      let correct = 0;
      let eitherNotes = 0;
      let eitherCorrect = 0;
      movements.forEach((m, i) => {
        const start = starts[i]!;
        const key = namedKey(start, semitones, centre);
        const t = transpose(m.midi, written[i]!, semitones, key.tonic - start.tonic) ?? transpose(m.midi, written[i]!, semitones - 12, key.tonic - start.tonic);
        if (t === undefined) return;
        const initialKey = declared ? key : undefined;
        const spelled = spellEvents(t.events, new FollowSpeller({ ...DEFAULT_FOLLOW, ...change, initialKey }));
        const r = scoreSpelling(spelled, t.written);
        notes += r.notes;
        correct += r.correct;
        const o = scoreSpelling(spelled, t.otherName);
        eitherNotes += r.notes;
        eitherCorrect += Math.max(r.correct, o.correct);
        const signature = signatureOf(key) + 1;
        const b = bySignature.get(signature) ?? [0, 0];
        bySignature.set(signature, [b[0] + r.correct, b[1] + r.notes]);
      });
      const value = (100 * correct) / notes;
      if (value < worst.value) worst = { semitones, value };
      eitherWorst = Math.min(eitherWorst, (100 * eitherCorrect) / eitherNotes);
      figures.push(`+${semitones} ${pct(correct, notes)}`);
    }
    const bins = [...bySignature.entries()].sort((a, b) => a[0] - b[0]).map(([signature, [c, n]]) => `${signature}: ${pct(c, n)}`);
    process.stdout.write(
      `  ${name.padEnd(12)} worst +${worst.semitones} ${worst.value.toFixed(2)} (either name ${eitherWorst.toFixed(2)})   ${figures.join('  ')}\n    by key signature (sharps +, flats −): ${bins.join('  ')}\n`,
    );
  }
}

if (process.argv[1] === fileURLToPath(import.meta.url)) {
  const only = process.argv[2]?.split(',') ?? CORPORA;
  const change = JSON.parse(process.argv[3] ?? '{}') as Partial<FollowParameters>;
  const which = process.argv[4];
  if (which !== 'declared') benchEveryKey(false, only, change);
  if (which !== 'undeclared') benchEveryKey(true, only, change);
}
