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

const ALIASES: Readonly<Record<string, Mode>> = { maj: 'major', min: 'minor', m: 'minor' };

/** Parses `D minor`, `Bb major`, `F# dorian`, `Dm`, `G` (major when no mode is given). */
export function parseKey(text: string, what = 'key'): DeclaredKey {
  const match = /^\s*([A-Ga-g][#b♯♭x𝄪𝄫]*)\s*([A-Za-z]*)\s*$/u.exec(text);
  if (!match) throw new UserError(`${what} "${text}" is not a key: write a tonic and a mode, as in "D minor", "Bb major", "E phrygian"`);
  const [, tonicText = '', modeText = ''] = match;
  const lower = modeText.toLowerCase();
  const mode = lower === '' ? 'major' : (ALIASES[lower] ?? (MODES as readonly string[]).find((m) => m === lower));
  if (mode === undefined) throw new UserError(`${what} "${text}": unknown mode "${modeText}" (use ${MODES.join(', ')})`);
  return { tonic: parsePitchClass(tonicText, what), mode: mode as Mode };
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
