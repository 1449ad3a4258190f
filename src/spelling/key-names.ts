// Naming the keys the follow speller finds: of a key's enharmonic names (F♯ or G♭ major) the one
// nearest the key in force, the declared key or the naming centre, how far past seven accidentals a
// name may go, and the home key that renames them all (pure functions over a naming context).
import { mod } from '../util/errors.js';

/** A key as the follower estimates it: a tonic on the line of fifths and a mode. */
export interface Key {
  readonly tonic: number;
  readonly mode: 'major' | 'minor';
}

/** Keys are written with at most seven sharps or flats: signatures −7…+7 (C♭ major … C♯ major). */
export const MAX_SIGNATURE = 7;
/**
 * Past seven accidentals, each accidental costs one fifth of distance in naming. On the sharp side a
 * key up to two fifths from the one in force may take up to nine sharps (G♯ major, the dominant of
 * C♯ major, and from there D♯ major; G♯ major from F♯ major); on the flat side a key whose window
 * lies within four fifths of the key in force's may take eight flats if it is minor (D♭ minor,
 * the minor subdominant of A♭ major, also from F minor), and any key with eight accidentals one
 * fifth from the key in force (F♭ major from C♭ major). Further keys only as below.
 */
const BEYOND_COST = 1;
const EIGHTH_REACH = 4;
const NEAR_SHARP_REACH = 2;
const NEAR_SHARP_MOST = 9;
/** The most accidentals a key named past seven may have (D♯ major, nine; A♯ major, ten). */
const MAX_FAR_SIGNATURE = 10;
/** The same from a remote declared key: E♯ major, eleven sharps, is the dominant of A♯ minor. */
const MAX_DECLARED_SIGNATURE = 11;
/**
 * When the key was declared, keys are named nearest it; when it is a remote key (its window
 * `REMOTE_KEY` fifths or more from home), names may go to `MAX_DECLARED_SIGNATURE` accidentals (D♯
 * major, the dominant of G♯ major, from a declared C♯ major), at `BEYOND_COST` per accidental
 * past seven: a piece declared in a remote key keeps its side of the circle through its
 * modulations (E♯ minor from D♯ minor, not F minor), while one declared in E♭ major that moves to
 * E major is not read in F♭ major.
 */
const REMOTE_KEY = 4;
/**
 * With no key declared, keys past seven sharps (up to `MAX_FAR_SIGNATURE`) are named when the
 * music's region (the key's window centre averaged over time, halving every `REGION_HALF_LIFE_MS` in follow.ts)
 * lies at `SHARP_REGION` or beyond on the line of fifths (F♯ major, G♯ minor and sharper) and the
 * key lies within `SHARP_REACH` fifths of the one in force: a piece in C♯ major names its mediant
 * E♯ minor and its V/vi D♯ major, as keyboard music in the sharpest keys writes them (common
 * practice, from memory), instead of falling to F minor and E♭ major and staying on the flat side.
 * Past seven flats only the old rule applies (measured: letting flats go as far lost up to six
 * points on pieces in five flats).
 */
const SHARP_REGION = 8;
const SHARP_REACH = 4;

/**
 * With no key declared, the piece's home key is the key that has been in force for the most notes,
 * the n-th note heard counting 1 / (1 + n / `HOME_NOTES`): a piece states its key first, so the
 * opening outweighs a long second half in the dominant. When the home key's name, as the keys have
 * been named so far, is not its name from the naming centre (D♭ major where the naming centre
 * says C♯ major, because the piece was first heard in E♯ minor and that was named F minor), every
 * key from then on is named 12 fifths the other way, which renames the home key. Not when the key
 * in force would then pass seven accidentals, nor when the home key is named with eight
 * accidentals and the key a fifth below it, of which it is likely the dominant, has been in force
 * for `DOMINANT_SHARE` of its notes or more (G♯ major in a C♯ major piece stays G♯, not A♭).
 * Measured on the corpora moved to every key (bench/every-key.ts).
 */
const HOME_NOTES = 10;
const DOMINANT_SHARE = 0.3;

/** The flattest fifth of a key's diatonic set: major's tonic less one fifth, minor's less four (as keySignatureOf). */
export function signatureOf(key: Key): number {
  return key.tonic - (key.mode === 'major' ? 1 : 4);
}

/** How many sharps or flats the key's signature has. */
export function accidentalsOf(key: Key): number {
  return Math.abs(signatureOf(key) + 1);
}

/** The centre on the line of fifths of the key's window (as keyWindow: C major E♭..G♯, 2.5; A minor B♭..D♯, 3.5). */
export function windowCentreOf(key: Key): number {
  return key.tonic + (key.mode === 'major' ? 2.5 : 0.5);
}


/**
 * The two ways keyboard music names the keys of five to seven accidentals, as naming centres: the
 * names of Baroque keyboard music (C♯ major, D♯ minor: 4) and those of later music (D♭ major, E♭
 * minor: 3). Both name F♯ and B major, G♯, C♯ and B♭ minor and A♭ major alike (common practice,
 * from memory). Tested in test/spelling/key-names.test.ts.
 */
export const KEY_NAMES = { baroque: 4, later: 3 } as const;
export type KeyNames = keyof typeof KEY_NAMES;

/** What naming a key depends on: where the speller stands now. */
export interface NamingContext {
  /** True while the key in force is only the starting guess: names come from the naming centre. */
  readonly guessing: boolean;
  readonly current: Key;
  /** The window centre of the key the player declared, if any. */
  readonly declaredCentre: number | undefined;
  /** The centre of the home window (the style prior). */
  readonly homeCentre: number;
  /** The music's region (see `SHARP_REGION`), NaN until a key is found. */
  readonly region: number;
  readonly namingCentre: number;
}

/** The chroma (0…11, C = 0) of a position on the line of fifths. */
export function chromaAt(fifths: number): number {
  return mod(7 * fifths, 12);
}

/**
 * The name of a key (tonic chroma and mode): of its enharmonic names (F♯ or G♭ major) the one
 * whose window is nearer the current key's, or, while the current key is only a guess, nearer the
 * naming centre; ties go sharpward. Keys are written with at most seven sharps or flats; a key
 * near the one in force may take more (G♯ major from C♯ minor, D♭ minor from A♭ major: see
 * `BEYOND_COST` and `mayGoBeyond`), and the next key found comes back within seven when it can.
 * When the player declared the key, names are taken nearest the declared key instead, and from a
 * remote declared key up to eleven accidentals (see `MAX_DECLARED_SIGNATURE`).
 */
export function nameKey(tonicChroma: number, mode: Key['mode'], at: NamingContext): Key {
  const base = mod(7 * tonicChroma, 12);
  const from = at.guessing ? at.namingCentre : (at.declaredCentre ?? windowCentreOf(at.current));
  let best: Key | undefined;
  let bestCost = Infinity;
  for (let tonic = base - 24; tonic <= base + 24; tonic += 12) {
    const key: Key = { tonic, mode };
    const accidentals = accidentalsOf(key);
    const beyond = Math.max(0, accidentals - MAX_SIGNATURE);
    if (beyond > 0 && !mayGoBeyond(key, accidentals, at)) continue;
    const cost = Math.abs(windowCentreOf(key) - from) + BEYOND_COST * beyond + 1e-3 * Math.abs(windowCentreOf(key) - at.namingCentre);
    if (cost <= bestCost) {
      best = key;
      bestCost = cost;
    }
  }
  return best ?? { tonic: base, mode };
}

/** Whether a key past seven accidentals may be named (see `BEYOND_COST`, `MAX_FAR_SIGNATURE`, `MAX_DECLARED_SIGNATURE`). */
function mayGoBeyond(key: Key, accidentals: number, at: NamingContext): boolean {
  if (at.guessing) return false;
  const { current, declaredCentre } = at;
  if (declaredCentre !== undefined && Math.abs(declaredCentre - at.homeCentre) >= REMOTE_KEY) return accidentals <= MAX_DECLARED_SIGNATURE;
  if (at.region >= SHARP_REGION && signatureOf(key) > 0 && accidentals <= MAX_FAR_SIGNATURE && Math.abs(windowCentreOf(key) - windowCentreOf(current)) <= SHARP_REACH) return true;
  if (signatureOf(key) > 0) return accidentals <= NEAR_SHARP_MOST && Math.abs(key.tonic - current.tonic) <= NEAR_SHARP_REACH;
  if (accidentals !== MAX_SIGNATURE + 1) return false;
  if (Math.abs(key.tonic - current.tonic) <= 1) return true;
  return key.mode === 'minor' && Math.abs(windowCentreOf(key) - windowCentreOf(current)) <= EIGHTH_REACH;
}

/** The tonic of `key`'s name within seven accidentals nearest `centre`. */
export function tonicNearest(key: Key, centre: number): number {
  let best = key.tonic;
  let bestDistance = Infinity;
  for (let tonic = key.tonic - 24; tonic <= key.tonic + 24; tonic += 12) {
    const other: Key = { tonic, mode: key.mode };
    const distance = Math.abs(windowCentreOf(other) - centre);
    if (accidentalsOf(other) <= MAX_SIGNATURE && distance < bestDistance) {
      best = tonic;
      bestDistance = distance;
    }
  }
  return best;
}

/** The home key (see `HOME_NOTES`): how many notes each key was in force for, the opening counting most. */
export class HomeKey {
  private notesHeard = 0;
  /** Per key: chroma, +12 if minor. */
  private readonly counts = new Float64Array(24);

  reset(): void {
    this.notesHeard = 0;
    this.counts.fill(0);
  }

  /** Counts `count` new notes for `key`, the key in force (none while it is only a guess). */
  count(count: number, key: Key, guessing: boolean): void {
    this.notesHeard += count;
    if (guessing) return;
    this.counts[chromaAt(key.tonic) + (key.mode === 'minor' ? 12 : 0)]! += count / (1 + this.notesHeard / HOME_NOTES);
  }

  /** How many fifths (0 or ±12) every key's name must move so that the home key takes its name from the naming centre. */
  shift(at: NamingContext): number {
    if (at.guessing || at.declaredCentre !== undefined) return 0;
    let home = 0;
    for (let i = 1; i < 24; i++) if (this.counts[i]! > this.counts[home]!) home = i;
    const named = nameKey(home % 12, home < 12 ? 'major' : 'minor', at);
    const shift = tonicNearest(named, at.namingCentre) - named.tonic;
    if (shift === 0) return 0;
    if (accidentalsOf({ tonic: at.current.tonic + shift, mode: at.current.mode }) > MAX_SIGNATURE) return 0;
    if (accidentalsOf(named) === MAX_SIGNATURE + 1) {
      const below = chromaAt(named.tonic - 1);
      if (Math.max(this.counts[below]!, this.counts[below + 12]!) >= DOMINANT_SHARE * this.counts[home]!) return 0;
    }
    return shift;
  }
}
