import { UserError } from '../util/errors.js';
import { alterationOf, letterOf, pitchClassOf, type Letter, type PitchClass } from './pitch-class.js';
import { spelledPitch, type SpelledPitch } from './spelled-pitch.js';

/** Largest alteration accepted in a written name (three sharps or three flats). */
export const MAX_ALTERATION = 3;

const NAME = /^([A-Ga-g])([#b♯♭𝄪𝄫x]*)(-?\d+)?$/u;
const ACCIDENTAL_VALUES: Readonly<Record<string, number>> = { '#': 1, '♯': 1, x: 2, '𝄪': 2, b: -1, '♭': -1, '𝄫': -2 };

interface ParsedName {
  readonly letter: Letter;
  readonly alteration: number;
  readonly octave: number | undefined;
}

function parseName(text: string, what: string): ParsedName {
  const trimmed = text.trim();
  const match = NAME.exec(trimmed);
  if (!match) {
    throw new UserError(`${what} "${text}" is not a note name: write a letter A–G, then # or b (♯ ♭ 𝄪 𝄫 too), then an optional octave, as in G#4, Ab3, F##2`);
  }
  const [, letterText = '', accidentals = '', octaveText] = match;
  let alteration = 0;
  for (const symbol of accidentals) alteration += ACCIDENTAL_VALUES[symbol] ?? 0;
  const mixed = /[#♯x𝄪]/u.test(accidentals) && /[b♭𝄫]/u.test(accidentals);
  if (mixed) throw new UserError(`${what} "${text}" mixes sharps and flats`);
  if (Math.abs(alteration) > MAX_ALTERATION) {
    throw new UserError(`${what} "${text}" has ${Math.abs(alteration)} ${alteration > 0 ? 'sharps' : 'flats'}; at most ${MAX_ALTERATION} are allowed`);
  }
  return {
    letter: letterText.toUpperCase() as Letter,
    alteration,
    octave: octaveText === undefined ? undefined : Number(octaveText),
  };
}

/** Parses a spelled pitch class such as `Eb`, `G#`, `F𝄪`; an octave is refused. */
export function parsePitchClass(text: string, what = 'pitch class'): PitchClass {
  const parsed = parseName(text, what);
  if (parsed.octave !== undefined) throw new UserError(`${what} "${text}" must not carry an octave (write ${text.replace(/-?\d+$/u, '')})`);
  return pitchClassOf(parsed.letter, parsed.alteration);
}

/** Parses a spelled pitch with its octave, such as `G#4`, `Bbb5`, `C-1`. */
export function parseSpelledPitch(text: string, what = 'note'): SpelledPitch {
  const parsed = parseName(text, what);
  if (parsed.octave === undefined) throw new UserError(`${what} "${text}" needs an octave, as in ${text.trim()}4`);
  return spelledPitch(pitchClassOf(parsed.letter, parsed.alteration), parsed.octave);
}

export interface NameStyle {
  /** `unicode` writes ♯ ♭ 𝄪 𝄫; `ascii` writes # and b repeated. */
  readonly accidentals: 'ascii' | 'unicode';
}

const ASCII: NameStyle = { accidentals: 'ascii' };

function accidentalText(alteration: number, style: NameStyle): string {
  if (style.accidentals === 'ascii') return alteration >= 0 ? '#'.repeat(alteration) : 'b'.repeat(-alteration);
  const count = Math.abs(alteration);
  const [double, single] = alteration > 0 ? ['𝄪', '♯'] : ['𝄫', '♭'];
  return double.repeat(Math.floor(count / 2)) + single.repeat(count % 2);
}

export function formatPitchClass(pc: PitchClass, style: NameStyle = ASCII): string {
  return letterOf(pc) + accidentalText(alterationOf(pc), style);
}

export function formatSpelledPitch(p: SpelledPitch, style: NameStyle = ASCII): string {
  return formatPitchClass(p, style) + String(p.octave);
}
