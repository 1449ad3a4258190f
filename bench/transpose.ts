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
  /** The same spellings with the piece named in its other key (F♯ major rather than G♭ major: 12 fifths the other way). */
  readonly otherName: Array<{ tick: number; key: number; spelling: string }>;
}

/**
 * `midi` and its `written` spellings moved up by `semitones`; the interval is `interval` fifths
 * when given (≡ 7 · semitones mod 12), or else named so that the piece's mean line-of-fifths
 * position lands nearest `CENTRE`; undefined if a note leaves 0…127.
 */
export function transpose(
  midi: MidiFileContent,
  written: ReadonlyArray<{ tick: number; key: number; spelling: string }>,
  semitones: number,
  interval?: number,
): Transposed | undefined {
  const fifths = written.map((w) => parseSpelledPitch(w.spelling).fifths);
  const mean = fifths.reduce((a, b) => a + b, 0) / Math.max(1, fifths.length);
  const base = mod(7 * semitones, 12);
  if (interval !== undefined && mod(interval, 12) !== base) throw new RangeError(`${interval} fifths is not a transposition by ${semitones} semitones`);
  const shift = interval ?? base + 12 * Math.round((CENTRE - mean - base) / 12);
  const events: FileEvent[] = [];
  for (const e of midi.events) {
    const [status = 0, key = 0] = e.data;
    const kind = status & 0xf0;
    if (kind !== 0x80 && kind !== 0x90) continue;
    const moved = key + semitones;
    if (moved < 0 || moved > 127) return undefined;
    events.push({ ...e, data: [status, moved, e.data[2] ?? 0] });
  }
  const moved = (by: number): Transposed['written'] => {
    const out: Transposed['written'] = [];
    written.forEach((w, i) => {
      const f = fifths[i]! + by;
      if (Math.abs(f) > 19) return; // beyond double sharps and flats: no such spelling to compare
      out.push({ tick: w.tick, key: w.key + semitones, spelling: formatSpelledPitch(onKey(pitchClass(f), w.key + semitones)) });
    });
    return out;
  };
  const other = shift + (mean + shift < CENTRE ? 12 : -12);
  return { mean: mean + shift, shift, events, written: moved(shift), otherName: moved(other) };
}

