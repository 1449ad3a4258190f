import { readFileSync } from 'node:fs';
import { DEFAULT_WINDOW, formatSpelledPitch } from '../src/pitch/index.js';
import { parseWrittenSpellings, scoreSpelling, spellEvents, spellTake, type TakeEvent } from './accuracy.js';
import { DEFAULT_FOLLOW, FollowSpeller, type FollowParameters } from '../src/spelling/follow.js';
import { fixedSpeller, type NoteContext, type Speller } from '../src/spelling/speller.js';
import { CORPORA, corpusDir, loadCorpus, type Movement } from './corpus.js';
import { perform, performedEvents, writtenNotes, type PerformanceOptions } from './performance.js';
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

/** The movements of a corpus in two halves, in file-name order: the first and the second half. */
export function halves<T>(movements: readonly T[]): [T[], T[]] {
  const middle = Math.ceil(movements.length / 2);
  return [movements.slice(0, middle), movements.slice(middle)];
}

/** The written spelling of each note-on of a movement, in file order (matched by tick and key). */
export function writtenSpellingsInOrder(m: Movement): Array<string | undefined> {
  const byOnset = new Map<string, string[]>();
  for (const w of parseWrittenSpellings(readFileSync(m.csvPath, 'utf8'))) {
    const id = `${w.tick}:${w.key}`;
    byOnset.set(id, [...(byOnset.get(id) ?? []), w.spelling]);
  }
  return writtenNotes(m.midi.events).map((n) => byOnset.get(`${n.tick}:${n.key}`)?.shift());
}

/**
 * Accuracy of a speller on performances of the movements (bench/performance.ts, one seed per
 * movement), counting the performed notes that stand for a written note on its written key.
 */
export function scorePerformances(
  corpus: readonly Movement[],
  make: () => Speller,
  gatherMs: number,
  options: Partial<PerformanceOptions> = {},
): { notes: number; correct: number } {
  let notes = 0;
  let correct = 0;
  corpus.forEach((m, index) => {
    const written = writtenSpellingsInOrder(m);
    const performance = perform(writtenNotes(m.midi.events), { ...options, seed: (options.seed ?? 1) * 1000 + index });
    const events: TakeEvent[] = performedEvents(performance).map((e) => {
      const n = performance.notes[e.note]!;
      return { time: e.time, on: e.on, id: e.note, key: n.key, channel: n.channel, velocity: n.velocity };
    });
    const spelled = spellTake(events, make(), gatherMs);
    performance.notes.forEach((n, i) => {
      if (n.kind !== 'played' || n.written === undefined) return;
      const expected = written[n.written];
      const got = spelled.get(i);
      if (expected === undefined || got === undefined) return;
      notes++;
      if (formatSpelledPitch(got) === expected) correct++;
    });
  });
  return { notes, correct };
}

const pct = (c: number, n: number): string => (n === 0 ? '-' : `${((100 * c) / n).toFixed(2)}%`);

function percentile(sorted: Float64Array, q: number): number {
  return sorted[Math.min(sorted.length - 1, Math.floor(q * sorted.length))]!;
}

/** Microseconds per note of `follow` on the live path: one `spell` call per note-on, with note-offs. */
function liveCost(corpus: readonly Movement[], parameters: FollowParameters): { p50: number; p99: number; notes: number } {
  const samples: number[] = [];
  for (const m of corpus) {
    const speller = new FollowSpeller(parameters);
    for (const e of m.midi.events) {
      const [status = 0, key = 0, velocity = 0] = e.data;
      const kind = status & 0xf0;
      if (kind !== 0x90 && kind !== 0x80) continue;
      const note: NoteContext = { key, velocity, time: e.time, channel: status & 0x0f, source: 0 };
      if (kind === 0x90 && velocity > 0) {
        const t0 = process.hrtime.bigint();
        speller.spell([note]);
        samples.push(Number(process.hrtime.bigint() - t0) / 1000);
      } else speller.noteOff(note);
    }
  }
  const sorted = Float64Array.from(samples).sort();
  return { p50: percentile(sorted, 0.5), p99: percentile(sorted, 0.99), notes: sorted.length };
}

/** Gathering windows measured on performances: none, 30 ms (what the README suggests live) and 40 ms (the widest chord spread generated). */
const GATHERS = [0, 30, 40] as const;

/**
 * Spelling accuracy on the five open corpora (notes spelled as written): follow against the fixed
 * E♭..G♯ window, each corpus whole and in halves (the parameters were chosen on all of them; a
 * half far from the other would show fitting); then on generated performances, and the cost per note.
 */
export function benchSpelling(parameters: FollowParameters = DEFAULT_FOLLOW): void {
  const corpora = CORPORA.map((name) => ({ name, movements: loadCorpus(corpusDir(name)) })).filter((c) => c.movements.length > 0);
  if (corpora.length === 0) {
    process.stdout.write('\n(spelling bench skipped: no corpus in corpus/)\n');
    return;
  }
  heading('spelling accuracy on the open corpora (notes spelled as written; halves in file-name order)');
  const columns = ['corpus', 'notes', 'follow', '1st half', '2nd half', 'Eb..G#', '1st half', '2nd half'];
  const widths = [12, 7, 9, 9, 9, 9, 9, 9];
  const row = (cells: string[]): string => `${cells.map((c, i) => (i === 0 ? c.padEnd(widths[i]!) : c.padStart(widths[i]!))).join(' ')}\n`;
  process.stdout.write(row(columns));
  const quantised = new Map<string, number>();
  const allConfusions = new Map<string, number>();
  for (const { name, movements } of corpora) {
    const follow = scoreCorpus(movements, () => new FollowSpeller(parameters));
    const fixed = scoreCorpus(movements, () => fixedSpeller(DEFAULT_WINDOW));
    const split = (s: CorpusScore): string[] =>
      halves(s.perMovement).map((h) => pct(h.reduce((a, m) => a + m.correct, 0), h.reduce((a, m) => a + m.notes, 0)));
    process.stdout.write(row([name, String(follow.notes), pct(follow.correct, follow.notes), ...split(follow), pct(fixed.correct, fixed.notes), ...split(fixed)]));
    quantised.set(name, (100 * follow.correct) / follow.notes);
    for (const [k, v] of follow.confusions) allConfusions.set(k, (allConfusions.get(k) ?? 0) + v);
  }
  const top = [...allConfusions.entries()].sort((a, b) => b[1] - a[1]).slice(0, 12);
  process.stdout.write(`follow's commonest errors (written→played): ${top.map(([k, v]) => `${k} ${v}`).join(', ')}\n`);

  heading('follow on generated performances (bench/performance.ts: rubato, chords spread 0-40 ms, slips)');
  process.stdout.write(`${'corpus'.padEnd(12)} ${'quantised'.padStart(9)}${GATHERS.map((g) => `gather ${g}`.padStart(11)).join('')}${'  (difference at 40)'}\n`);
  for (const { name, movements } of corpora) {
    const figures = GATHERS.map((g) => scorePerformances(movements, () => new FollowSpeller(parameters), g));
    const q = quantised.get(name)!;
    const last = figures[figures.length - 1]!;
    const diff = (100 * last.correct) / last.notes - q;
    process.stdout.write(`${name.padEnd(12)} ${`${q.toFixed(2)}%`.padStart(9)}${figures.map((f) => pct(f.correct, f.notes).padStart(11)).join('')}  ${diff >= 0 ? '+' : ''}${diff.toFixed(2)}\n`);
  }

  heading('follow: cost per note on the live path (one spell call per note-on)');
  const cost = liveCost(corpora.flatMap((c) => c.movements), parameters);
  process.stdout.write(`${cost.notes} notes: p50 ${cost.p50.toFixed(2)} µs, p99 ${cost.p99.toFixed(2)} µs\n`);
}
