import { DEFAULT_WINDOW, spellKey, type KeyboardWindow, type SpelledPitch } from '../pitch/index.js';

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

/**
 * Decides the spelling of each new note. Causal: it sees only what has happened. `spell` takes
 * the notes that begin together (a chord, or a single note) and returns a spelling of each key.
 */
export interface Speller {
  spell(notes: readonly NoteContext[]): SpelledPitch[];
  noteOff(note: NoteContext): void;
  /** The 12 spellings new notes would get now (for 12-class outputs and displays). */
  currentWindow(): KeyboardWindow;
}

/** The simplest speller: every key always takes its spelling in one 12-note window. */
export function fixedSpeller(window: KeyboardWindow = DEFAULT_WINDOW): Speller {
  return {
    spell: (notes) => notes.map((n) => spellKey(window, n.key)),
    noteOff: () => undefined,
    currentWindow: () => window,
  };
}
