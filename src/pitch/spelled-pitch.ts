import { LETTER_SEMITONES, alterationOf, letterOf, pitchClass, type PitchClass } from './pitch-class.js';

/**
 * A spelled pitch: a pitch class on the line of fifths plus its written octave
 * (scientific pitch notation, C4 = middle C). B♯3 and C4 share key 60 but are different pitches.
 */
export interface SpelledPitch extends PitchClass {
  readonly octave: number;
}

export function spelledPitch(pc: PitchClass, octave: number): SpelledPitch {
  if (!Number.isSafeInteger(octave)) throw new RangeError(`octave must be an integer, got ${octave}`);
  return { fifths: pc.fifths, octave };
}

/** The MIDI key number that sounds the spelling (C4 = 60, A4 = 69); may fall outside 0…127. */
export function keyOf(p: SpelledPitch): number {
  return 12 * (p.octave + 1) + LETTER_SEMITONES[letterOf(p)] + alterationOf(p);
}

/** The spelling of `pc` that sounds on `key`, or a RangeError when `pc` is not a spelling of that key. */
export function onKey(pc: PitchClass, key: number): SpelledPitch {
  const semitone = LETTER_SEMITONES[letterOf(pc)] + alterationOf(pc);
  const rest = key - semitone;
  if (rest % 12 !== 0) throw new RangeError(`fifths position ${pc.fifths} is not a spelling of key ${key}`);
  return spelledPitch(pitchClass(pc.fifths), rest / 12 - 1);
}

/**
 * Octaves from C4 in the decomposition `p = C4 + fifths·(fifth) + octaves·(octave)`.
 * Exact for every tuning whose octave is 2/1: `size(p) = size of the class + octaves · 1200 cents`.
 */
export function octavesFromC4(p: SpelledPitch): number {
  return (keyOf(p) - 60 - 7 * p.fifths) / 12;
}

export function samePitch(a: SpelledPitch, b: SpelledPitch): boolean {
  return a.fifths === b.fifths && a.octave === b.octave;
}
