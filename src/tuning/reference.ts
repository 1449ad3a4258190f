import Fraction from 'fraction.js';
import { formatSpelledPitch, keyOf, parseSpelledPitch, type NameStyle, type SpelledPitch } from '../pitch/index.js';
import { UserError } from '../util/errors.js';
import { divide, toFraction, value, type PitchRatio } from './ratio.js';
import { pitchSize, type Tuning } from './tuning.js';

/** The pitch everything is tuned to: a spelled note and its frequency (A4 = 415 Hz, C4 = 256 Hz …). */
export interface Reference {
  readonly pitch: SpelledPitch;
  /** Exact as written (`415`, `439.5`), so rational tunings give exact frequencies. */
  readonly hz: Fraction;
}

export const LOWEST_REFERENCE_HZ = 1;
export const HIGHEST_REFERENCE_HZ = 20_000;

export function reference(pitch: SpelledPitch, hz: number | string | Fraction): Reference {
  return { pitch, hz: hz instanceof Fraction ? hz : new Fraction(String(hz)) };
}

export const A440: Reference = reference(parseSpelledPitch('A4'), 440);

/** Parses `A4=415`, `C4=256`, `Bb3 = 233.08`. */
export function parseReference(text: string, what = 'reference'): Reference {
  const parts = text.split('=');
  if (parts.length !== 2) throw new UserError(`${what} "${text}" must be NOTE=HZ, as in A4=415`);
  const note = (parts[0] ?? '').trim();
  if (/^[A-Ga-g][#b♯♭x𝄪𝄫]*$/u.test(note)) throw new UserError(`${what} "${text}": the note needs its octave, as in ${note}4=${(parts[1] ?? '').trim() || '415'}`);
  const pitch = parseSpelledPitch(note, what);
  const hzText = (parts[1] ?? '').trim();
  if (!/^\d+(\.\d+)?$/u.test(hzText)) throw new UserError(`${what} "${text}": "${hzText}" is not a frequency in Hz`);
  const hz = Number(hzText);
  if (hz < LOWEST_REFERENCE_HZ || hz > HIGHEST_REFERENCE_HZ) {
    throw new UserError(`${what} "${text}": ${hzText} Hz is outside ${LOWEST_REFERENCE_HZ}–${HIGHEST_REFERENCE_HZ} Hz`);
  }
  return reference(pitch, hzText);
}

export function formatReference(ref: Reference, style?: NameStyle): string {
  return `${formatSpelledPitch(ref.pitch, style)}=${ref.hz.toString()}`;
}

/** The exact size of `p` above the reference note. */
export function sizeAboveReference(tuning: Tuning, ref: Reference, p: SpelledPitch): PitchRatio {
  return divide(pitchSize(tuning, p), pitchSize(tuning, ref.pitch));
}

/** Frequency of a spelled pitch in Hz. */
export function frequency(tuning: Tuning, ref: Reference, p: SpelledPitch): number {
  return ref.hz.valueOf() * value(sizeAboveReference(tuning, ref, p));
}

/** The exact frequency when the tuning makes it rational (Pythagorean and just tables), else undefined. */
export function exactFrequency(tuning: Tuning, ref: Reference, p: SpelledPitch): Fraction | undefined {
  return toFraction(sizeAboveReference(tuning, ref, p))?.mul(ref.hz);
}

/** Frequency of a MIDI key in 12-tone equal temperament at the same reference. */
export function equalTemperedHz(ref: Reference, key: number): number {
  return ref.hz.valueOf() * 2 ** ((key - keyOf(ref.pitch)) / 12);
}

/** How far the spelled pitch lies from the 12-ET pitch of its key at the same reference, in cents. */
export function equalTemperedDeviation(tuning: Tuning, ref: Reference, p: SpelledPitch): number {
  return 1200 * Math.log2(frequency(tuning, ref, p) / equalTemperedHz(ref, keyOf(p)));
}
