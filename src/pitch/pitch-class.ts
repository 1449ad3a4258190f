import { mod } from '../util/errors.js';

/** The seven letter names, in line-of-fifths order starting from F. */
export const LETTERS_BY_FIFTHS = ['F', 'C', 'G', 'D', 'A', 'E', 'B'] as const;
export type Letter = (typeof LETTERS_BY_FIFTHS)[number];

/** Position of each natural on the line of fifths (C = 0). */
export const LETTER_FIFTHS: Readonly<Record<Letter, number>> = { F: -1, C: 0, G: 1, D: 2, A: 3, E: 4, B: 5 };

/** Semitones of each natural above C. */
export const LETTER_SEMITONES: Readonly<Record<Letter, number>> = { C: 0, D: 2, E: 4, F: 5, G: 7, A: 9, B: 11 };

/**
 * A spelled pitch class: a point on the line of fifths (C = 0, G = 1, F = −1, G♯ = 8, A♭ = −4).
 * G♯ and A♭ are different pitch classes even though they share a key.
 */
export interface PitchClass {
  readonly fifths: number;
}

export function pitchClass(fifths: number): PitchClass {
  if (!Number.isSafeInteger(fifths)) throw new RangeError(`line-of-fifths position must be an integer, got ${fifths}`);
  return { fifths };
}

export function pitchClassOf(letter: Letter, alteration: number): PitchClass {
  return pitchClass(LETTER_FIFTHS[letter] + 7 * alteration);
}

export function letterOf(pc: PitchClass): Letter {
  return LETTERS_BY_FIFTHS[mod(pc.fifths + 1, 7)] as Letter;
}

/** Sharps (positive) or flats (negative) of the spelling: G♯ → 1, B𝄫 → −2. */
export function alterationOf(pc: PitchClass): number {
  return Math.floor((pc.fifths + 1) / 7);
}

/** The key's chroma, 0…11 with C = 0: the keyboard key class this spelling sounds on. */
export function chromaOf(pc: PitchClass): number {
  return mod(7 * pc.fifths, 12);
}

/** True when two pitch classes share a chroma but are spelled differently (G♯ and A♭). */
export function areEnharmonic(a: PitchClass, b: PitchClass): boolean {
  return a.fifths !== b.fifths && chromaOf(a) === chromaOf(b);
}

/** The spelling of `chroma` nearest to `centre` on the line of fifths (ties go sharpward). */
export function nearestSpelling(chroma: number, centre: number): PitchClass {
  const base = mod(7 * chroma, 12); // 7 is its own inverse mod 12
  const j = Math.round((centre - base) / 12);
  return pitchClass(base + 12 * j);
}
