import { formatSpelledPitch, keyOf, parseSpelledPitch } from '../../src/pitch/index.js';
import type { Speller } from '../../src/spelling/speller.js';

/**
 * The project's own short test pieces (original material, written for these tests): each a list of
 * chords written as they should be spelled. The speller hears only key numbers; the spellings are
 * the answer. Spellings follow common practice (no source): each chord is spelled as the triad or
 * seventh chord it is, in the key it belongs to.
 */
export interface TestPiece {
  readonly name: string;
  /** The key as a musician would declare it (for the `--key` runs). */
  readonly key: string;
  readonly chords: readonly (readonly string[])[];
}

export const CADENCE_IN_C_SHARP_MAJOR: TestPiece = {
  name: 'a cadence in C♯ major, then the scale up to the tonic',
  key: 'C# major',
  chords: [
    ['C#3', 'E#4', 'G#4', 'C#5'], // I
    ['F#3', 'F#4', 'A#4', 'C#5'], // IV
    ['F#3', 'D#4', 'A#4', 'D#5'], // ii6
    ['G#2', 'B#3', 'F#4', 'D#5'], // V7
    ['C#3', 'C#4', 'E#4', 'G#4'], // I
    ['D#4'], ['E#4'], ['F#4'], ['G#4'], ['A#4'], ['B#4'], ['C#5'],
    ['G#2', 'B#3', 'D#4', 'F#4'], // V7
    ['C#3', 'E#3', 'G#3', 'C#4'], // I
  ],
};

export const TO_G_SHARP_MINOR_AND_BACK: TestPiece = {
  name: 'E major, a modulation to G♯ minor, and back',
  key: 'E major',
  chords: [
    ['E3', 'G#3', 'B3', 'E4'], // E: I
    ['A3', 'C#4', 'E4', 'A4'], // IV
    ['B2', 'D#4', 'F#4', 'A4'], // V7
    ['E3', 'B3', 'E4', 'G#4'], // I
    ['C#3', 'E4', 'G#4', 'C#5'], // vi = g♯: iv
    ['D#3', 'F##4', 'A#4', 'D#5'], // g♯: V
    ['G#2', 'D#4', 'G#4', 'B4'], // i
    ['D#3', 'C#4', 'F##4', 'A#4'], // V7
    ['G#3', 'B3', 'D#4', 'G#4'], // i
    ['E3', 'B3', 'E4', 'G#4'], // VI = E: I
    ['C#3', 'E4', 'A4'], // IV6
    ['B2', 'D#4', 'F#4', 'A4'], // V7
    ['E3', 'E4', 'G#4', 'B4'], // I
  ],
};

export const CHROMATIC_LINE_IN_F_SHARP_MAJOR: TestPiece = {
  name: 'a chromatic bass line in F♯ major, from the tonic down to the dominant',
  key: 'F# major',
  chords: [
    ['F#2', 'A#3', 'C#4', 'F#4'], // I
    ['E#2', 'G#3', 'C#4', 'G#4'], // V6
    ['E2', 'A#3', 'C#4', 'F#4'], // V4/2 of IV
    ['D#2', 'B3', 'D#4', 'F#4'], // IV6
    ['D2', 'B3', 'D4', 'F#4'], // iv6 (the minor subdominant)
    ['C#2', 'C#4', 'E#4', 'G#4'], // V
    ['F#2', 'A#3', 'C#4', 'F#4'], // I
  ],
};

export const F_MINOR_AFTER_A_MINOR: TestPiece = {
  name: 'A minor, then an F minor chord',
  key: 'A minor',
  chords: [
    ['A3', 'C4', 'E4'], // i
    ['E3', 'G#3', 'B3', 'D4'], // V7
    ['A3', 'C4', 'E4'], // i
    ['F3', 'Ab3', 'C4'], // an F minor chord: A♭, not G♯ (an augmented second above F)
  ],
};

export const C_SHARP_MINOR_TO_ITS_DOMINANT: TestPiece = {
  name: 'C♯ minor, a passage in its dominant G♯ major, and back',
  key: 'C# minor',
  chords: [
    ['C#3', 'E4', 'G#4', 'C#5'], // c♯: i
    ['F#3', 'F#4', 'A4', 'C#5'], // iv
    ['G#2', 'B#3', 'D#4', 'G#4'], // V
    ['C#3', 'C#4', 'E4', 'G#4'], // i
    ['G#2', 'B#3', 'D#4', 'G#4'], // G♯: I
    ['D#3', 'F##3', 'A#3', 'D#4'], // V of G♯
    ['G#2', 'B#3', 'D#4', 'G#4'], // I
    ['C#3', 'C#4', 'E#4', 'G#4'], // IV (C♯ major)
    ['D#3', 'C#4', 'F##4', 'A#4'], // V7
    ['G#2', 'B#3', 'D#4', 'G#4'], // I = V of c♯
    ['C#3', 'C#4', 'E4', 'G#4'], // c♯: i
  ],
};

export const REMOTE_KEY_PIECES: readonly TestPiece[] = [CADENCE_IN_C_SHARP_MAJOR, TO_G_SHARP_MINOR_AND_BACK, CHROMATIC_LINE_IN_F_SHARP_MAJOR, C_SHARP_MINOR_TO_ITS_DOMINANT];

/** Plays chords (note names, one every `beatMs`), each held until the next; returns what the speller spelled. */
export function play(speller: Speller, chords: readonly (readonly string[])[], beatMs = 500, start = 0): string[][] {
  let time = start;
  let held: number[] = [];
  return chords.map((names) => {
    for (const key of held) speller.noteOff({ key, velocity: 0, time, channel: 0, source: 0 });
    const notes = names.map((n) => ({ key: keyOf(parseSpelledPitch(n)), velocity: 80, time, channel: 0, source: 0 }));
    held = notes.map((n) => n.key);
    const spelled = speller.spell(notes).map((p) => formatSpelledPitch(p));
    time += beatMs;
    return spelled;
  });
}
