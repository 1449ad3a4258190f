import { UserError, mod } from '../util/errors.js';
import { formatPitchClass, parsePitchClass, type NameStyle } from './names.js';
import { nearestSpelling, pitchClass, type PitchClass } from './pitch-class.js';
import { onKey, type SpelledPitch } from './spelled-pitch.js';

/** A run of consecutive positions on the line of fifths, `lowest` to `highest` inclusive. */
export interface FifthsRange {
  readonly lowest: number;
  readonly highest: number;
}

/** A 12-note keyboard window: 12 consecutive fifths, so every key has exactly one spelling in it. */
export interface KeyboardWindow extends FifthsRange {
  readonly kind: 'window';
}

export function keyboardWindow(lowest: number): KeyboardWindow {
  return { kind: 'window', lowest, highest: lowest + 11 };
}

/** The default window of most keyboard music of the period: E♭ to G♯. */
export const DEFAULT_WINDOW: KeyboardWindow = keyboardWindow(-3);

export function parseFifthsRange(text: string, what = 'range'): FifthsRange {
  const parts = text.split('..');
  if (parts.length !== 2) throw new UserError(`${what} "${text}" must be two pitch classes joined by "..", as in Eb..G#`);
  const lowest = parsePitchClass(parts[0] ?? '', what).fifths;
  const highest = parsePitchClass(parts[1] ?? '', what).fifths;
  if (highest < lowest) {
    throw new UserError(`${what} "${text}" runs flatward: write the flat end first, as in ${parts[1]}..${parts[0]}`);
  }
  return { lowest, highest };
}

export function parseWindow(text: string, what = 'window'): KeyboardWindow {
  const range = parseFifthsRange(text, what);
  const size = range.highest - range.lowest + 1;
  if (size !== 12) throw new UserError(`${what} "${text}" holds ${size} spellings (${size - 1} ${size === 2 ? 'fifth' : 'fifths'}); a keyboard window holds exactly 12, as in Eb..G#`);
  return keyboardWindow(range.lowest);
}

export function rangeClasses(range: FifthsRange): PitchClass[] {
  const classes: PitchClass[] = [];
  for (let f = range.lowest; f <= range.highest; f++) classes.push(pitchClass(f));
  return classes;
}

export function formatRange(range: FifthsRange, style?: NameStyle): string {
  return `${formatPitchClass(pitchClass(range.lowest), style)}..${formatPitchClass(pitchClass(range.highest), style)}`;
}

/** The spelling of a chroma (0…11) inside a window. */
export function spellChroma(window: KeyboardWindow, chroma: number): PitchClass {
  return nearestSpelling(chroma, window.lowest + 5.5);
}

/** The spelling of a MIDI key inside a window. */
export function spellKey(window: KeyboardWindow, key: number): SpelledPitch {
  return onKey(spellChroma(window, mod(key, 12)), key);
}

/** All spellings of a key with at most `maxAlteration` sharps or flats, flattest first. */
export function candidateSpellings(key: number, maxAlteration = 2): SpelledPitch[] {
  const base = nearestSpelling(mod(key, 12), 0).fifths;
  const limit = 5 + 7 * maxAlteration;
  const result: SpelledPitch[] = [];
  for (let f = base - 48; f <= base + 48; f += 12) {
    if (f >= -1 - 7 * maxAlteration && f <= limit) result.push(onKey(pitchClass(f), key));
  }
  return result;
}
