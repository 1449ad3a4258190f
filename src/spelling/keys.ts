import { formatPitchClass, keyboardWindow, parsePitchClass, type KeyboardWindow, type PitchClass } from '../pitch/index.js';
import { UserError } from '../util/errors.js';

/** The seven church modes, with major and minor as their usual names for Ionian and Aeolian. */
export const MODES = ['major', 'minor', 'ionian', 'dorian', 'phrygian', 'lydian', 'mixolydian', 'aeolian', 'locrian'] as const;
export type Mode = (typeof MODES)[number];

/** A declared key: a spelled tonic and a mode. */
export interface DeclaredKey {
  readonly tonic: PitchClass;
  readonly mode: Mode;
}

/** Where each mode's tonic sits in its diatonic set of seven fifths (F C G D A E B: Lydian F = 0, Ionian C = 1 …). */
const MODE_DEGREE: Readonly<Record<Mode, number>> = { lydian: 0, major: 1, ionian: 1, mixolydian: 2, dorian: 3, minor: 4, aeolian: 4, phrygian: 5, locrian: 6 };

/** Short forms of the modes, matched without regard to case except `M` (see parseKey). */
const ALIASES: Readonly<Record<string, Mode>> = { maj: 'major', min: 'minor', m: 'minor', dur: 'major', moll: 'minor' };

/** Keys are written with at most seven sharps or flats (common practice, no source). */
export const MAX_KEY_ACCIDENTALS = 7;

const ACCEPTED = '"D minor", "Dm", "D major", "F# minor", "Bb major", "E flat major", "E phrygian"';

/**
 * Parses a key as musicians write it: `D minor`, `d minor`, `Dm`, `Dmin`, `D`, `D major`, `Dmaj`,
 * `F# minor`, `Bb major`, `F♯ minor`, `E flat major`, `F sharp minor`, `E phrygian`; a tonic alone
 * is major; German names (`C dur`, `d-moll`, `B-dur` for B♭ major, `fis-moll`: see germanKey). Refused: a chord symbol's `M` (`DM`: major in chord symbols,
 * minor to some readers) or `-` (`D-`: minor in chord symbols, a slip to others), a
 * lowercase tonic alone (`d`: minor in some traditions, major in others) and keys of more than
 * seven sharps or flats (named with their enharmonic), each with the accepted forms.
 */
export function parseKey(text: string, what = 'key'): DeclaredKey {
  const german = germanKey(text);
  if (german) return checkedKey(german, text, what);
  const words = text.trim().replace(/[\s-]*flat\b/giu, 'b').replace(/[\s-]*sharp\b/giu, '#');
  const match = /^([A-Ga-g])([#b♯♭x𝄪𝄫]*)(?:\s*-?\s*)([A-Za-z]*)$/u.exec(words);
  if (!match) throw new UserError(`${what} "${text}" is not a key: write a tonic and a mode, as in ${ACCEPTED}`);
  const [, letter = '', accidentals = '', modeText = ''] = match;
  if (modeText === '' && /-\s*$/u.test(words)) {
    const tonic = `${letter.toUpperCase()}${accidentals}`;
    throw new UserError(`${what} "${text}" is ambiguous: "-" means minor in chord symbols and may be a slip; write "${tonic} minor" or "${tonic} major" (accepted: ${ACCEPTED})`);
  }
  if (modeText === 'M') throw new UserError(`${what} "${text}" is ambiguous: "M" means major in chord symbols; write "${letter.toUpperCase()}${accidentals} major" or "${letter.toUpperCase()}${accidentals} minor" (accepted: ${ACCEPTED})`);
  if (modeText === '' && letter === letter.toLowerCase()) {
    const tonic = `${letter.toUpperCase()}${accidentals}`;
    throw new UserError(`${what} "${text}" is ambiguous: a lowercase tonic alone means minor to some and major to others; write "${tonic} major" or "${tonic} minor" (accepted: ${ACCEPTED})`);
  }
  const lower = modeText.toLowerCase();
  const mode = lower === '' ? 'major' : (ALIASES[lower] ?? (MODES as readonly string[]).find((m) => m === lower));
  if (mode === undefined) throw new UserError(`${what} "${text}": unknown mode "${modeText}" (use ${MODES.join(', ')}, or m, min, maj; accepted: ${ACCEPTED})`);
  return checkedKey({ tonic: parsePitchClass(`${letter.toUpperCase()}${accidentals}`, what), mode: mode as Mode }, text, what);
}

/**
 * A key named in German, `dur` or `moll` after a German note name: B is B♭ and H is B; `-is`
 * raises and `-es` (`-s` after A and E) lowers (`fis-moll`, `Es-dur`, `As-dur`, `B-dur`: common
 * practice, no source). Undefined when `text` is not such a name.
 */
function germanKey(text: string): DeclaredKey | undefined {
  const match = /^([a-h])(isis|is|eses|es|s)?\s*-?\s*(dur|moll)$/iu.exec(text.trim());
  if (!match) return undefined;
  const [, letter = '', suffix = '', word = ''] = match;
  const lower = letter.toLowerCase();
  if (suffix.toLowerCase() === 's' && lower !== 'a' && lower !== 'e') return undefined;
  if (lower === 'b' && suffix !== '') return undefined; // B is already B♭; "Bes" and the like are not written
  const accidentals = lower === 'b' ? 'b' : { '': '', is: '#', isis: '##', es: 'b', eses: 'bb', s: 'b' }[suffix.toLowerCase()] ?? '';
  const name = `${lower === 'h' ? 'B' : lower.toUpperCase()}${accidentals}`;
  return { tonic: parsePitchClass(name), mode: word.toLowerCase() === 'dur' ? 'major' : 'minor' };
}

/** `key`, refused if it has more than seven sharps or flats (named with its enharmonic). */
function checkedKey(key: DeclaredKey, text: string, what: string): DeclaredKey {
  const signature = keySignatureOf(key) + 1;
  if (Math.abs(signature) > MAX_KEY_ACCIDENTALS) {
    const enharmonic: DeclaredKey = { tonic: { fifths: key.tonic.fifths - 12 * Math.sign(signature) }, mode: key.mode };
    throw new UserError(
      `${what} "${text}" has ${Math.abs(signature)} ${signature > 0 ? 'sharps' : 'flats'}; keys go up to ${MAX_KEY_ACCIDENTALS}: write ${formatKey(enharmonic)}`,
    );
  }
  return key;
}

export function formatKey(key: DeclaredKey): string {
  return `${formatPitchClass(key.tonic)} ${key.mode}`;
}

/** The flattest fifth of the key's diatonic set (−1 for C major and A minor: F). */
export function keySignatureOf(key: DeclaredKey): number {
  return key.tonic.fifths - MODE_DEGREE[key.mode];
}

/** Major-like modes (a major third above the tonic) lean sharpward; minor-like ones keep the lowered second. */
export function isMajorLike(mode: Mode): boolean {
  return MODE_DEGREE[mode] <= 2;
}

/**
 * The 12 spellings a key's notes take: its seven diatonic ones and the chromatic inflections
 * usual in its mode. Major-like: the lowered 7th and 3rd and the raised 4th, 1st and 5th
 * (C major: E♭..G♯). Minor-like: the lowered 2nd and the raised 6th, 7th, 3rd and 4th (A minor:
 * B♭..D♯). These match the written spellings of the corpus degree by degree (see DEVELOPERS.md).
 */
export function keyWindow(key: DeclaredKey): KeyboardWindow {
  return keyboardWindow(key.tonic.fifths - (isMajorLike(key.mode) ? 3 : 5));
}
