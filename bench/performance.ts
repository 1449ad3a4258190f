import { seededRandom } from './random.js';
/**
 * A seeded performance generator: it plays a file's written notes as a person might, so that
 * spelling (and score following) can be measured on input that is not quantised.
 *
 * Pure and deterministic: the same notes, options and seed give the same performance. Every
 * performed note says which written note it stands for (`written`), and how (`kind`), so that a
 * measure can count only the notes that belong to the score.
 *
 * What it does to the score, each part switchable:
 * - tempo: a slow tempo drift and a faster phrase rubato, both as smooth multiplicative curves of
 *   the local tempo (the time map stays monotonic);
 * - onsets: Gaussian jitter per onset (shared by the notes of a chord), and the notes of a chord
 *   spread over 0…`chordSpreadMs` (randomly or rolled upward);
 * - mistakes: wrong notes (the key moved by ±1 or ±2 semitones), dropped notes, and inserted
 *   ornaments (a short upper or lower neighbour just before a note).
 */
import type { FileEvent } from '../src/render/smf.js';

/** A written note: a note-on of the file with its note-off. */
export interface WrittenNote {
  /** Position in the file's note-ons, in file order. */
  readonly index: number;
  readonly tick: number;
  /** Milliseconds, through the file's tempo map. */
  readonly time: number;
  readonly end: number;
  readonly key: number;
  readonly channel: number;
  readonly velocity: number;
}

export type PerformedKind = 'played' | 'wrong' | 'ornament';

export interface PerformedNote {
  readonly time: number;
  readonly end: number;
  readonly key: number;
  readonly channel: number;
  readonly velocity: number;
  /** `played`: the written note as written; `wrong`: it, on a wrong key; `ornament`: added. */
  readonly kind: PerformedKind;
  /** The written note this one stands for (its `index`); undefined for an ornament. */
  readonly written: number | undefined;
}

export interface Performance {
  /** Sorted by onset time. */
  readonly notes: readonly PerformedNote[];
  /** Indices of the written notes left out. */
  readonly dropped: readonly number[];
}

export interface PerformanceOptions {
  readonly seed: number;
  /** Slow drift of the tempo: peak deviation as a fraction (0.08: ±8 %) and its period in ms. */
  readonly tempoDrift: number;
  readonly tempoPeriodMs: number;
  /** Phrase rubato: peak deviation as a fraction and the phrase length in ms. */
  readonly rubato: number;
  readonly phraseMs: number;
  /** Standard deviation of each onset's timing error, in ms (a chord shares one). */
  readonly onsetJitterMs: number;
  /** Notes of a chord arrive spread over 0…this many ms. */
  readonly chordSpreadMs: number;
  /** `random`: each note of a chord at its own offset; `rolled`: low to high, evenly over the spread. */
  readonly chordOrder: 'random' | 'rolled';
  /** Probabilities per written note. */
  readonly wrongNoteRate: number;
  readonly dropRate: number;
  readonly ornamentRate: number;
  /** Length of an inserted neighbour note, in ms; it ends as the note it ornaments begins. */
  readonly ornamentMs: number;
}

/** A careful player: gentle rubato, chords spread over up to 40 ms, a few slips. */
export const DEFAULT_PERFORMANCE: PerformanceOptions = {
  seed: 1,
  tempoDrift: 0.08,
  tempoPeriodMs: 30_000,
  rubato: 0.06,
  phraseMs: 4000,
  onsetJitterMs: 6,
  chordSpreadMs: 40,
  chordOrder: 'random',
  wrongNoteRate: 0.003,
  dropRate: 0.003,
  ornamentRate: 0.005,
  ornamentMs: 70,
};

/** The file's notes: each note-on paired with the next note-off of its channel and key. */
export function writtenNotes(events: readonly FileEvent[]): WrittenNote[] {
  const notes: Array<WrittenNote & { end: number }> = [];
  const open = new Map<number, number[]>();
  for (const e of events) {
    const [status = 0, key = 0, velocity = 0] = e.data;
    const kind = status & 0xf0;
    if (kind !== 0x90 && kind !== 0x80) continue;
    const id = (status & 0x0f) * 128 + key;
    if (kind === 0x90 && velocity > 0) {
      const note = { index: notes.length, tick: e.tick, time: e.time, end: Infinity, key, channel: status & 0x0f, velocity };
      notes.push(note);
      open.set(id, [...(open.get(id) ?? []), note.index]);
    } else {
      const index = open.get(id)?.shift();
      if (index !== undefined) notes[index]!.end = e.time;
    }
  }
  for (const n of notes) if (!Number.isFinite(n.end)) n.end = n.time + 500;
  return notes;
}


/** A standard normal deviate (Box–Muller). */
function gaussian(next: () => number): number {
  return Math.sqrt(-2 * Math.log(1 - next())) * Math.cos(2 * Math.PI * next());
}

/** Plays the written notes with the options' tempo, timing and mistakes. */
export function perform(notes: readonly WrittenNote[], options: Partial<PerformanceOptions> = {}): Performance {
  const o = { ...DEFAULT_PERFORMANCE, ...options };
  const next = seededRandom(o.seed);
  const phase1 = 2 * Math.PI * next();
  const phase2 = 2 * Math.PI * next();
  const rate = (t: number): number => Math.exp(o.tempoDrift * Math.sin((2 * Math.PI * t) / o.tempoPeriodMs + phase1) + o.rubato * Math.sin((2 * Math.PI * t) / o.phraseMs + phase2));

  // The time map: written ms → performed ms, integrated over the written onsets and ends.
  const times = [...new Set(notes.flatMap((n) => [n.time, n.end]))].sort((a, b) => a - b);
  const map = new Map<number, number>();
  let performed = 0;
  let previous = times[0] ?? 0;
  for (const t of times) {
    performed += (t - previous) * rate((t + previous) / 2);
    map.set(t, performed);
    previous = t;
  }
  const at = (t: number): number => map.get(t) ?? t;

  const out: PerformedNote[] = [];
  const dropped: number[] = [];
  const byOnset = new Map<number, WrittenNote[]>();
  for (const n of notes) byOnset.set(n.time, [...(byOnset.get(n.time) ?? []), n]);
  for (const [time, chord] of byOnset) {
    const onset = at(time) + o.onsetJitterMs * gaussian(next);
    const spread = chord.length > 1 ? o.chordSpreadMs * next() : 0;
    const ordered = [...chord].sort((a, b) => a.key - b.key);
    ordered.forEach((n, i) => {
      if (next() < o.dropRate) {
        dropped.push(n.index);
        return;
      }
      const offset = chord.length === 1 ? 0 : o.chordOrder === 'rolled' ? (spread * i) / (chord.length - 1) : o.chordSpreadMs * next();
      const start = Math.max(0, onset + offset);
      const end = Math.max(start + 10, at(n.end) + o.onsetJitterMs * gaussian(next));
      if (next() < o.ornamentRate) {
        const step = (next() < 0.5 ? 1 : 2) * (next() < 0.5 ? -1 : 1);
        const key = Math.min(127, Math.max(0, n.key + step));
        const begin = Math.max(0, start - o.ornamentMs);
        out.push({ time: begin, end: start, key, channel: n.channel, velocity: n.velocity, kind: 'ornament', written: undefined });
      }
      const wrong = next() < o.wrongNoteRate;
      const key = wrong ? Math.min(127, Math.max(0, n.key + (next() < 0.5 ? 1 : 2) * (next() < 0.5 ? -1 : 1))) : n.key;
      out.push({ time: start, end, key, channel: n.channel, velocity: n.velocity, kind: wrong ? 'wrong' : 'played', written: n.index });
    });
  }
  out.sort((a, b) => a.time - b.time || a.key - b.key);
  return { notes: out, dropped };
}

/** A performed note-on or note-off, for feeding a speller or an engine in time order. */
export interface PerformedEvent {
  readonly time: number;
  readonly on: boolean;
  /** Index into `Performance.notes`. */
  readonly note: number;
}

/**
 * The performance as note-ons and note-offs in time order (a note-off before a note-on at the same
 * time; a key struck again before its release ends the earlier note first, as a keyboard does).
 */
export function performedEvents(performance: Performance): PerformedEvent[] {
  const events: PerformedEvent[] = [];
  performance.notes.forEach((n, i) => {
    events.push({ time: n.time, on: true, note: i });
    events.push({ time: n.end, on: false, note: i });
  });
  return events.sort((a, b) => a.time - b.time || Number(a.on) - Number(b.on));
}
