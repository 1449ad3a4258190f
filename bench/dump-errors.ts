// Prints the follow speller's errors on a corpus with the notes around them and the key it found
// (run by hand: node dist/bench/dump-errors.js CORPUS [how many] [every nth error]).
import { readFileSync } from 'node:fs';
import { formatPitchClass, formatSpelledPitch } from '../src/pitch/index.js';
import { DEFAULT_FOLLOW, FollowSpeller } from '../src/spelling/follow.js';
import { parseWrittenSpellings, spellEvents } from './accuracy.js';
import { corpusDir, loadCorpus, type CorpusName } from './corpus.js';

const name = (process.argv[2] ?? 'mozart') as CorpusName;
const limit = Number(process.argv[3] ?? 60);
const every = Number(process.argv[4] ?? 7);
let shown = 0;
let count = 0;

for (const m of loadCorpus(corpusDir(name))) {
  const speller = new FollowSpeller(DEFAULT_FOLLOW);
  const keys: string[] = [];
  const orig = speller.spell.bind(speller);
  speller.spell = (notes) => {
    const r = orig(notes);
    const k = speller.currentKey();
    notes.forEach(() => keys.push(k ? `${formatPitchClass(k.tonic)} ${k.mode}` : '(no key yet)'));
    return r;
  };
  const spelled = spellEvents(m.midi.events, speller);
  const byOnset = new Map<string, string[]>();
  for (const w of parseWrittenSpellings(readFileSync(m.csvPath, 'utf8'))) {
    const id = `${w.tick}:${w.key}`;
    byOnset.set(id, [...(byOnset.get(id) ?? []), w.spelling]);
  }
  const expected = spelled.map((s) => byOnset.get(`${s.tick}:${s.key}`)?.shift());
  spelled.forEach((s, i) => {
    const e = expected[i];
    if (e === undefined || formatSpelledPitch(s.pitch) === e) return;
    count++;
    if (count % every !== 0 || shown >= limit) return;
    shown++;
    const ctx = (from: number, to: number): string =>
      spelled
        .slice(Math.max(0, from), Math.max(0, to))
        .map((t, j) => {
          const ex = expected[from + j];
          const got = formatSpelledPitch(t.pitch);
          return `${(t.time / 1000).toFixed(2)}:${ex ?? '?'}${ex !== undefined && ex !== got ? `(${got})` : ''}`;
        })
        .join(' ');
    process.stdout.write(`${m.name} t=${(s.time / 1000).toFixed(2)} key ${keys[i]} written ${e} got ${formatSpelledPitch(s.pitch)}\n   before: ${ctx(i - 10, i)}\n   after:  ${ctx(i + 1, i + 7)}\n`);
  });
}
process.stdout.write(`${count} errors\n`);
