import { describe, expect, it } from 'vitest';
import {
  areEnharmonic,
  candidateSpellings,
  DEFAULT_WINDOW,
  formatRange,
  formatSpelledPitch,
  keyOf,
  nearestSpelling,
  onKey,
  parseFifthsRange,
  parsePitchClass,
  parseWindow,
  spellKey,
} from '../../src/pitch/index.js';

const names = (ps: readonly { fifths: number; octave: number }[]): string[] => ps.map((p) => formatSpelledPitch(p));

describe('keys and windows', () => {
  it('maps spellings to MIDI keys with C4 = 60 and A4 = 69 (MIDI 1.0 key numbering)', () => {
    expect(keyOf(onKey(parsePitchClass('A'), 69))).toBe(69);
    expect(formatSpelledPitch(onKey(parsePitchClass('B#'), 60))).toBe('B#3');
    expect(formatSpelledPitch(onKey(parsePitchClass('Cb'), 59))).toBe('Cb4');
    expect(() => onKey(parsePitchClass('G#'), 67)).toThrow(RangeError);
  });

  it('lists the candidate spellings of a key', () => {
    expect(names(candidateSpellings(68))).toEqual(['Ab4', 'G#4']);
    expect(names(candidateSpellings(60))).toEqual(['Dbb4', 'C4', 'B#3']);
    expect(names(candidateSpellings(62, 1))).toEqual(['D4']);
  });

  it('spells every key exactly once inside a 12-note window', () => {
    expect(formatRange(DEFAULT_WINDOW)).toBe('Eb..G#');
    const spelled = Array.from({ length: 12 }, (_, i) => formatSpelledPitch(spellKey(DEFAULT_WINDOW, 60 + i)));
    expect(spelled).toEqual(['C4', 'C#4', 'D4', 'Eb4', 'E4', 'F4', 'F#4', 'G4', 'G#4', 'A4', 'Bb4', 'B4']);
    const flats = parseWindow('Gb..B');
    expect(formatSpelledPitch(spellKey(flats, 66))).toBe('Gb4');
    expect(formatSpelledPitch(spellKey(flats, 59))).toBe('B3');
    expect(formatSpelledPitch(spellKey(parseWindow('G..B#'), 60))).toBe('B#3');
    expect(formatSpelledPitch(spellKey(DEFAULT_WINDOW, -1))).toBe('B-2');
  });

  it('refuses windows that are not 12 fifths wide or run backwards', () => {
    expect(() => parseWindow('Eb..A')).toThrow(/holds 7 spellings \(6 fifths\); a keyboard window holds exactly 12/u);
    expect(() => parseFifthsRange('G#..Eb')).toThrow(/runs flatward/u);
    expect(() => parseFifthsRange('Eb-G#')).toThrow(/joined by "\.\."/u);
    expect(parseFifthsRange('Gb..A#')).toEqual({ lowest: -6, highest: 10 });
  });

  it('finds the spelling nearest a centre and recognises enharmonic pairs', () => {
    expect(nearestSpelling(8, 0)).toEqual({ fifths: -4 }); // A♭ nearer C than G♯
    expect(nearestSpelling(8, 3)).toEqual({ fifths: 8 }); // in A: G♯
    expect(areEnharmonic(parsePitchClass('G#'), parsePitchClass('Ab'))).toBe(true);
    expect(areEnharmonic(parsePitchClass('G#'), parsePitchClass('G#'))).toBe(false);
  });
});
