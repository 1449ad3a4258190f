import { DEFAULT_WINDOW, type SpelledPitch } from '../../src/pitch/index.js';
import type { NoteContext, Speller } from '../../src/spelling/speller.js';

/** A speller whose choices the test dictates, note by note. */
export function scriptedSpeller(choose: (note: NoteContext) => SpelledPitch): Speller {
  return {
    spell: (notes) => notes.map(choose),
    peek: choose,
    noteOff: () => undefined,
    currentWindow: () => DEFAULT_WINDOW,
    currentTonic: () => undefined,
  };
}
