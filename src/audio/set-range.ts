import { chromaOf, DEFAULT_WINDOW, formatRange, keyboardWindow, pitchClass, type FifthsRange, type KeyboardWindow } from '../pitch/index.js';
import { keySignatureOf, keyWindow, MODES, type DeclaredKey } from '../spelling/keys.js';
import type { Strategy } from '../spelling/strategy.js';
import { cents, type Tuning } from '../tuning/index.js';

/** A set has one MIDI channel per spelling. */
export const SET_CHANNELS = 16;

/**
 * The spellings a strategy can give a note (its reach on the line of fifths): a fixed window,
 * a declared key's window, or for `follow` every key it may take, those of at most seven sharps
 * or flats (the keys' windows from src/spelling/keys.ts). Player's controls (flip, shift) are not
 * counted: they reach further on purpose.
 */
export function spellingReach(strategy: Strategy, key: DeclaredKey | undefined, window: KeyboardWindow | undefined): FifthsRange {
  if (strategy === 'fixed') return window ?? DEFAULT_WINDOW;
  if (strategy === 'key' && key) return keyWindow(key);
  let lowest = Infinity;
  let highest = -Infinity;
  for (const mode of ['major', 'minor'] as const satisfies ReadonlyArray<(typeof MODES)[number]>) {
    for (let tonic = -15; tonic <= 15; tonic++) {
      const k: DeclaredKey = { tonic: pitchClass(tonic), mode };
      const flattest = keySignatureOf(k); // seven flats: F♭ (−8) is the flattest fifth; seven sharps: F♯ (6)
      if (flattest < -8 || flattest > 6) continue;
      const w = keyWindow(k);
      lowest = Math.min(lowest, w.lowest);
      highest = Math.max(highest, w.highest);
    }
  }
  return { lowest, highest };
}

/** Does the tuning give two spellings of one key different pitches (G♯ ≠ A♭)? */
export function distinguishesSpellings(tuning: Tuning): boolean {
  for (let f = -7; f <= 7; f++) {
    const a = tuning.classSize(pitchClass(f));
    const b = tuning.classSize(pitchClass(f + 12)); // the same key, spelled twelve fifths sharper
    if (chromaOf(pitchClass(f)) !== chromaOf(pitchClass(f + 12))) continue;
    const apart = Math.abs(cents(a) - cents(b));
    if (Math.abs(apart - 1200 * Math.round(apart / 1200)) > 0.01) return true;
  }
  return false;
}

/**
 * The default range of a set: when the tuning gives enharmonic spellings different pitches, the
 * 16 spellings D♭..A♯ (every key of up to two sharps or flats, in both modes, but B minor's E♯);
 * when it does not (a well temperament), the 12 of E♭..G♯ already hold every pitch it has.
 */
export function defaultSetRange(tuning: Tuning): FifthsRange {
  return distinguishesSpellings(tuning) ? { lowest: -5, highest: -5 + SET_CHANNELS - 1 } : keyboardWindow(DEFAULT_WINDOW.lowest);
}

/** A warning when the set's range leaves out spellings the strategy can give, or undefined. */
export function reachWarning(range: FifthsRange, reach: FifthsRange, strategy: Strategy, tuning: Tuning): string | undefined {
  if (!distinguishesSpellings(tuning)) return undefined; // every spelling the set lacks has the same pitch as one it holds
  if (reach.lowest >= range.lowest && reach.highest <= range.highest) return undefined;
  return `the set holds ${formatRange(range)}, but --spelling ${strategy} can give ${formatRange(reach)}: a spelling outside the set plays the set's other spelling of its key, at that spelling's pitch`;
}
