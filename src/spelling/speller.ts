import { noteId, type NoteId } from '../midi/note-id.js';
import { DEFAULT_WINDOW, spellKey, type KeyboardWindow, type PitchClass, type SpelledPitch } from '../pitch/index.js';
import { keyWindow, type DeclaredKey } from './keys.js';

/** What a speller knows of a note as it arrives. */
export interface NoteContext {
  readonly key: number;
  readonly velocity: number;
  /** Milliseconds, from the event's own timestamp. */
  readonly time: number;
  /** Input channel 0…15 and input source (device) number. */
  readonly channel: number;
  readonly source: number;
}

/** The physical key a note came from, as the engine names it. */
export function noteIdOf(note: NoteContext): NoteId {
  return noteId(note.source, note.channel, note.key);
}

/**
 * Decides the spelling of each new note. Causal: it sees only what has happened. `spell` takes
 * the notes that begin together (a chord, or a single note) and returns a spelling of each key.
 */
export interface Speller {
  spell(notes: readonly NoteContext[]): SpelledPitch[];
  /** The spelling a note would take now, without hearing it (to respell held notes). */
  peek(note: NoteContext): SpelledPitch;
  noteOff(note: NoteContext): void;
  /** The 12 spellings new notes would get now (for 12-class outputs and displays). */
  currentWindow(): KeyboardWindow;
  /** The tonic of the context, for tunings built on one (just intonation); undefined: the tuning's own. */
  currentTonic(): PitchClass | undefined;
  /** Optional: the key in force now (declared, or as the strategy estimates it), for displays. */
  currentKey?(): DeclaredKey | undefined;
  /** Optional: the tonic of the key the player declared (`--key`, a set-key control), not an estimate. */
  declaredTonic?(): PitchClass | undefined;
  /** Optional: jumps to a declared key (a control action). */
  setKey?(key: DeclaredKey): void;
  /** Optional (a score follower): the player starts again from the beginning. */
  restartScore?(): void;
  /** Optional (a score follower): the player is at this bar; false when the score has no such bar. */
  goToBar?(bar: string): boolean;
  /** Optional: while frozen the context holds still, nothing heard moves it (a strategy with no context has nothing to freeze). */
  setFrozen?(frozen: boolean): void;
}

/**
 * `fixed`: every key takes its spelling in one 12-note window; `key`: the window of a declared key
 * (whose tonic also moves a just table). Setting a key turns either into the key's window.
 */
export class WindowSpeller implements Speller {
  private window: KeyboardWindow;
  private tonic: PitchClass | undefined;
  private key: DeclaredKey | undefined;
  /** Each key's spelling in the window, filled as keys are played. */
  private spelled: Array<SpelledPitch | undefined> = [];

  constructor(windowOrKey: KeyboardWindow | DeclaredKey = DEFAULT_WINDOW) {
    if ('kind' in windowOrKey) {
      this.window = windowOrKey;
      this.tonic = undefined;
    } else {
      this.window = keyWindow(windowOrKey);
      this.tonic = windowOrKey.tonic;
      this.key = windowOrKey;
    }
  }

  spell(notes: readonly NoteContext[]): SpelledPitch[] {
    return notes.map((n) => this.peek(n));
  }

  peek(note: NoteContext): SpelledPitch {
    return (this.spelled[note.key] ??= spellKey(this.window, note.key));
  }

  noteOff(): void {}

  currentWindow(): KeyboardWindow {
    return this.window;
  }

  currentTonic(): PitchClass | undefined {
    return this.tonic;
  }

  currentKey(): DeclaredKey | undefined {
    return this.key;
  }

  setKey(key: DeclaredKey): void {
    this.window = keyWindow(key);
    this.tonic = key.tonic;
    this.key = key;
    this.spelled = [];
  }
}

export function fixedSpeller(window: KeyboardWindow = DEFAULT_WINDOW): Speller {
  return new WindowSpeller(window);
}
