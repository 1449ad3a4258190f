import { chromaOf, keyboardWindow, onKey, spellChroma, type KeyboardWindow, type PitchClass, type SpelledPitch } from '../pitch/index.js';
import { mod } from '../util/errors.js';
import type { DeclaredKey } from './keys.js';
import type { NoteContext, Speller } from './speller.js';

/** A split-key entry: notes from this input channel (and source), on one key or all keys, take a fixed spelling or window. */
export interface SplitKey {
  /** Input channel 0…15; undefined matches any. */
  readonly channel: number | undefined;
  /** Input source (device) number; undefined matches any. */
  readonly source: number | undefined;
  /** A key 0…127, or undefined for every key of that channel/source. */
  readonly key: number | undefined;
  /** The spelling for that key (a pitch class), or a window for the whole channel. */
  readonly spelling: PitchClass | KeyboardWindow;
}

export type Force = 'sharps' | 'flats' | undefined;

const BLACK = new Set([1, 3, 6, 8, 10]);
/** Every black key as a sharp (F..A♯) or as a flat (G♭..B). */
const SHARPS_WINDOW = keyboardWindow(-1);
const FLATS_WINDOW = keyboardWindow(-6);

/**
 * The player's overrides over a spelling strategy: a flip (black keys take their other spelling),
 * a window shift, forced sharps or flats, freezing, setting a key, and split-key maps that give a
 * second manual or extra keys the alternates. The strategy still hears every note.
 */
export class ControlledSpeller implements Speller {
  private flipped = false;
  private shifted = 0;
  private forced: Force = undefined;
  private isFrozen = false;
  private strategy: Speller;

  constructor(
    base: Speller,
    private readonly splits: readonly SplitKey[] = [],
    /** The key the player declared, if any; a set-key control replaces it. */
    private declared: DeclaredKey | undefined = undefined,
  ) {
    this.strategy = base;
  }

  /** The strategy underneath (follow, key, fixed, a score). */
  get base(): Speller {
    return this.strategy;
  }

  /**
   * A new strategy underneath (a concert programme's next piece) and its declared key. The
   * player's latches (flip, force, freeze) stay as the pedals left them; the window shift, like
   * set-key's, starts again from the new strategy. Notes still sounding end through the new
   * strategy, which ignores notes it did not spell.
   */
  replaceBase(base: Speller, key: DeclaredKey | undefined): void {
    this.strategy = base;
    this.declared = key;
    this.shifted = 0;
    if (this.isFrozen) base.setFrozen?.(true);
  }

  currentKey(): DeclaredKey | undefined {
    return this.base.currentKey?.();
  }

  declaredTonic(): PitchClass | undefined {
    return this.declared?.tonic;
  }

  private split(note: NoteContext): SpelledPitch | undefined {
    for (const s of this.splits) {
      if (s.channel !== undefined && s.channel !== note.channel) continue;
      if (s.source !== undefined && s.source !== note.source) continue;
      if (s.key !== undefined && s.key !== note.key) continue;
      const pc = 'kind' in s.spelling ? spellChroma(s.spelling, mod(note.key, 12)) : s.spelling;
      if (chromaOf(pc) === mod(note.key, 12)) return onKey(pc, note.key);
    }
    return undefined;
  }

  private adjust(note: NoteContext, pitch: SpelledPitch): SpelledPitch {
    if (!this.flipped && this.forced === undefined && this.shifted === 0) return pitch;
    const chroma = mod(note.key, 12);
    const window = this.currentWindow();
    let pc: PitchClass = this.forced !== undefined || this.shifted !== 0 ? spellChroma(window, chroma) : pitch;
    if (this.flipped && BLACK.has(chroma)) {
      const middle = window.lowest + 5.5;
      pc = { fifths: pc.fifths > middle ? pc.fifths - 12 : pc.fifths + 12 };
    }
    return onKey(pc, note.key);
  }

  spell(notes: readonly NoteContext[]): SpelledPitch[] {
    const heard = this.base.spell(notes);
    if (this.splits.length === 0 && !this.flipped && this.forced === undefined && this.shifted === 0) return heard;
    return notes.map((n, i) => this.split(n) ?? this.adjust(n, heard[i]!));
  }

  peek(note: NoteContext): SpelledPitch {
    return this.split(note) ?? this.adjust(note, this.base.peek(note));
  }

  noteOff(note: NoteContext): void {
    this.base.noteOff(note);
  }

  currentWindow(): KeyboardWindow {
    if (this.forced === 'sharps') return SHARPS_WINDOW;
    if (this.forced === 'flats') return FLATS_WINDOW;
    return keyboardWindow(this.base.currentWindow().lowest + this.shifted);
  }

  currentTonic(): PitchClass | undefined {
    return this.base.currentTonic();
  }

  /** The player's overrides now, for displays. */
  get overrides(): SpellerOverrides {
    return { flip: this.flipped, shift: this.shifted, force: this.forced, frozen: this.isFrozen };
  }

  /** Black keys take their other spelling while on. */
  setFlip(on: boolean): void {
    this.flipped = on;
  }

  /** Moves the window along the line of fifths (+1: one spelling sharper). */
  shiftBy(steps: number): void {
    this.shifted += steps;
  }

  /** Every black key a sharp, or a flat, or undefined for the strategy's own choice. */
  setForce(force: Force): void {
    this.forced = force;
  }

  setFrozen(frozen: boolean): void {
    this.isFrozen = frozen;
    this.base.setFrozen?.(frozen);
  }

  /** The score follower (if the strategy follows a score) starts again from the beginning. */
  restartScore(): void {
    this.base.restartScore?.();
  }

  /** The score follower (if any) goes to a bar; false when there is no score or no such bar. */
  goToBar(bar: string): boolean {
    return this.base.goToBar?.(bar) ?? false;
  }

  setKey(key: DeclaredKey): void {
    this.shifted = 0;
    this.declared = key;
    this.base.setKey?.(key);
  }
}

export interface SpellerOverrides {
  readonly flip: boolean;
  readonly shift: number;
  readonly force: Force;
  readonly frozen: boolean;
}
