// Moving a corpus movement to another key: its notes by a number of semitones and its written
// spellings by the same interval (transposition moves every spelling by one interval: common
// practice, no source), so the follow speller can be measured in every key.
import { formatSpelledPitch, onKey, parseSpelledPitch, pitchClass } from '../src/pitch/index.js';
import type { FileEvent, MidiFileContent } from '../src/render/smf.js';
import { mod } from '../src/util/errors.js';

/** Where the mean written position of a transposed piece is kept: within ±6 fifths of D. */
const CENTRE = 2;

export interface Transposed {
  /** The mean line-of-fifths position of the transposed written notes. */
  readonly mean: number;
  /** The interval of the transposition in fifths. */
  readonly shift: number;
  readonly events: FileEvent[];
  readonly written: Array<{ tick: number; key: number; spelling: string }>;
}

/**
 * `midi` and its `written` spellings moved up by `semitones`, the interval named so that the
 * piece's mean line-of-fifths position lands nearest `CENTRE`; undefined if a key leaves 0…127.
 */
export function transpose(midi: MidiFileContent, written: ReadonlyArray<{ tick: number; key: number; spelling: string }>, semitones: number): Transposed | undefined {
  const fifths = written.map((w) => parseSpelledPitch(w.spelling).fifths);
  const mean = fifths.reduce((a, b) => a + b, 0) / Math.max(1, fifths.length);
  // The interval in fifths: ≡ 7 · semitones (mod 12), nearest to keeping the mean around CENTRE.
  const base = mod(7 * semitones, 12);
  const shift = base + 12 * Math.round((CENTRE - mean - base) / 12);
  const events: FileEvent[] = [];
  for (const e of midi.events) {
    const [status = 0, key = 0] = e.data;
    const kind = status & 0xf0;
    if (kind !== 0x80 && kind !== 0x90) continue;
    const moved = key + semitones;
    if (moved > 127) return undefined;
    events.push({ ...e, data: [status, moved, e.data[2] ?? 0] });
  }
  const movedWritten: Transposed['written'] = [];
  written.forEach((w, i) => {
    const f = fifths[i]! + shift;
    if (Math.abs(f) > 19) return; // beyond double sharps and flats: no such spelling to compare
    movedWritten.push({ tick: w.tick, key: w.key + semitones, spelling: formatSpelledPitch(onKey(pitchClass(f), w.key + semitones)) });
  });
  return { mean: mean + shift, shift, events, written: movedWritten };
}

