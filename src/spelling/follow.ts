import { onKey, pitchClass, spellChroma, spellKey, type KeyboardWindow, type PitchClass, type SpelledPitch } from '../pitch/index.js';
import { isMajorLike, keySignatureOf, keyWindow, type DeclaredKey } from './keys.js';
import { mod } from '../util/errors.js';
import type { NoteContext, Speller } from './speller.js';

/** Parameters of the following speller (all have defaults; the setup file may change them). */
export interface FollowParameters {
  /** Half-life of a note's weight in the running estimate, in milliseconds. */
  readonly halfLifeMs: number;
  /** Extra weight of each note while it is held, relative to a fresh note. */
  readonly heldWeight: number;
  /** How much better a new key must correlate (0…2) before it replaces the current one. */
  readonly hysteresis: number;
  /** The key assumed at the start (C major), and its weight as if that many notes had been heard. */
  readonly initialKey: Key;
  readonly initialWeight: number;
}

/** A key as the follower estimates it: a tonic on the line of fifths and a mode. */
export interface Key {
  readonly tonic: number;
  readonly mode: 'major' | 'minor';
}

export const DEFAULT_FOLLOW: FollowParameters = {
  halfLifeMs: 4000,
  heldWeight: 1,
  hysteresis: 0.02,
  initialKey: { tonic: 0, mode: 'major' },
  initialWeight: 4,
};

/**
 * Key profiles of Krumhansl and Kessler (1982), as tabulated in Krumhansl, Cognitive Foundations
 * of Musical Pitch (1990): the fit of each chroma above the tonic (from memory).
 */
const MAJOR_PROFILE = [6.35, 2.23, 3.48, 2.33, 4.38, 4.09, 2.52, 5.19, 2.39, 3.66, 2.29, 2.88];
const MINOR_PROFILE = [6.33, 2.68, 3.52, 5.38, 2.6, 3.53, 2.54, 4.75, 3.98, 2.69, 3.34, 3.17];

/** The flattest fifth of a key's diatonic set: major's tonic less one fifth, minor's less four. */
export function signatureOf(key: Key): number {
  return keySignatureOf(asDeclared(key));
}

function asDeclared(key: Key): DeclaredKey {
  return { tonic: pitchClass(key.tonic), mode: key.mode };
}

/** A profile centred on its mean and scaled to unit length, so a correlation is one dot product. */
function normalise(profile: readonly number[]): Float64Array {
  const mean = profile.reduce((a, b) => a + b, 0) / profile.length;
  const centred = profile.map((v) => v - mean);
  const length = Math.sqrt(centred.reduce((a, v) => a + v * v, 0));
  return Float64Array.from(centred, (v) => v / length);
}

const PROFILES = { major: normalise(MAJOR_PROFILE), minor: normalise(MINOR_PROFILE) } as const;

/**
 * Follows the harmony causally. It keeps a time-decayed weight per key (chroma) of the notes
 * heard, plus the notes held, and finds the key that fits them best (Krumhansl–Schmuckler key
 * finding); each new note is spelled in that key's 12-note window: its diatonic set plus the
 * lowered and raised degrees usual in the mode. Working from chromas rather than from spelled
 * notes, the estimate cannot drift by feeding on its own spellings; of the enharmonic
 * equivalents of the best tonic it takes the one nearest the last on the line of fifths, and it
 * changes key only when the new one fits clearly better (hysteresis). This places the
 * line-of-fifths centre of Longuet-Higgins's, Temperley's and Chew & Chen's spellers at the key.
 */
export class FollowSpeller implements Speller {
  private readonly weights: number[] = new Array<number>(12).fill(0);
  private lastTime = 0;
  private current: Key;
  private readonly held = new Map<number, number>();
  private frozen = false;

  constructor(private readonly p: FollowParameters = DEFAULT_FOLLOW) {
    this.current = p.initialKey;
    this.believe(p.initialKey);
  }

  /** Starts over in `key`, as if `initialWeight` notes had been heard in it. */
  private believe(key: Key): void {
    this.current = key;
    const profile = key.mode === 'major' ? MAJOR_PROFILE : MINOR_PROFILE;
    const tonicChroma = chromaAt(key.tonic);
    const total = profile.reduce((a, b) => a + b, 0);
    profile.forEach((v, i) => (this.weights[(tonicChroma + i) % 12] = (this.p.initialWeight * v) / total));
  }

  setKey(key: DeclaredKey): void {
    this.believe({ tonic: key.tonic.fifths, mode: isMajorLike(key.mode) ? 'major' : 'minor' });
  }

  setFrozen(frozen: boolean): void {
    this.frozen = frozen;
  }

  currentTonic(): PitchClass {
    return pitchClass(this.current.tonic);
  }

  private decayTo(time: number): void {
    if (time <= this.lastTime) return;
    const factor = 0.5 ** ((time - this.lastTime) / this.p.halfLifeMs);
    for (let i = 0; i < 12; i++) this.weights[i]! *= factor;
    this.lastTime = time;
  }

  private readonly scratch = new Float64Array(12);

  /** Correlation of the weights (centred, in `scratch`) with a key's profile, over `norm`. */
  private score(tonicChroma: number, mode: Key['mode'], norm: number): number {
    const profile = PROFILES[mode];
    let dot = 0;
    for (let i = 0; i < 12; i++) dot += this.scratch[(tonicChroma + i) % 12]! * profile[i]!;
    return norm === 0 ? 0 : dot / norm;
  }

  private update(): void {
    const w = this.scratch;
    for (let i = 0; i < 12; i++) w[i] = this.weights[i]!;
    for (const chroma of this.held.values()) w[chroma]! += this.p.heldWeight;
    let mean = 0;
    for (let i = 0; i < 12; i++) mean += w[i]!;
    mean /= 12;
    let norm = 0;
    for (let i = 0; i < 12; i++) {
      w[i]! -= mean;
      norm += w[i]! * w[i]!;
    }
    norm = Math.sqrt(norm);
    const currentScore = this.score(chromaAt(this.current.tonic), this.current.mode, norm);
    let bestChroma = -1;
    let bestMode: Key['mode'] = this.current.mode;
    let bestScore = currentScore;
    for (let chroma = 0; chroma < 12; chroma++) {
      for (const mode of ['major', 'minor'] as const) {
        const s = this.score(chroma, mode, norm);
        if (s > bestScore) {
          bestChroma = chroma;
          bestMode = mode;
          bestScore = s;
        }
      }
    }
    if (bestChroma >= 0 && bestScore - currentScore > this.p.hysteresis) this.current = this.nearestSpelledKey(bestChroma, bestMode);
  }

  /**
   * The spelling of a key (tonic chroma and mode) as written: at most seven sharps or flats in its
   * signature, and of two such spellings (F♯ or G♭ major) the one nearer the current key.
   */
  private nearestSpelledKey(tonicChroma: number, mode: Key['mode']): Key {
    const base = mod(7 * tonicChroma, 12);
    let best: Key | undefined;
    for (let tonic = base - 24; tonic <= base + 24; tonic += 12) {
      const key: Key = { tonic, mode };
      if (Math.abs(signatureOf(key) + 1) > 7) continue;
      if (!best || Math.abs(signatureOf(key) - signatureOf(this.current)) < Math.abs(signatureOf(best) - signatureOf(this.current))) best = key;
    }
    return best ?? { tonic: base, mode };
  }

  /** The key the speller believes it is in. */
  get key(): Key {
    return this.current;
  }

  spell(notes: readonly NoteContext[]): SpelledPitch[] {
    if (notes.length === 0) return [];
    if (!this.frozen) {
      this.decayTo(notes[0]!.time);
      for (const n of notes) this.weights[mod(n.key, 12)]! += 1;
      this.update();
    }
    // The whole group counts before any of it is spelled, and all of it takes one window:
    // notes that begin together are spelled together, as a compact group.
    const window = this.currentWindow();
    return notes.map((n) => {
      this.held.set(noteId(n), mod(n.key, 12));
      return onKey(spellChroma(window, mod(n.key, 12)), n.key);
    });
  }

  peek(note: NoteContext): SpelledPitch {
    return spellKey(this.currentWindow(), note.key);
  }

  noteOff(note: NoteContext): void {
    this.held.delete(noteId(note));
  }

  currentWindow(): KeyboardWindow {
    return keyWindow(asDeclared(this.current));
  }
}

function chromaAt(fifths: number): number {
  return mod(7 * fifths, 12);
}

function noteId(n: NoteContext): number {
  return n.source * 2048 + n.channel * 128 + n.key;
}
