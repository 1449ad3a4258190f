import { Note } from '@tonaljs/tonal';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  alterationOf,
  chromaOf,
  formatPitchClass,
  formatSpelledPitch,
  keyOf,
  letterOf,
  parsePitchClass,
  parseSpelledPitch,
  pitchClass,
  spelledPitch,
  type Letter,
} from '../../src/pitch/index.js';
import { UserError } from '../../src/util/errors.js';

describe('pitch names', () => {
  it('parses ASCII and Unicode spellings to line-of-fifths positions', () => {
    // Positions on the line of fifths (C = 0, G♯ = 8, A♭ = −4): the convention of ../shared/DESIGN.md.
    expect(parseSpelledPitch('G#4')).toEqual({ fifths: 8, octave: 4 });
    expect(parseSpelledPitch('Ab3')).toEqual({ fifths: -4, octave: 3 });
    expect(parseSpelledPitch('F##2')).toEqual({ fifths: 13, octave: 2 });
    expect(parseSpelledPitch('Bbb5')).toEqual({ fifths: -9, octave: 5 });
    expect(parsePitchClass('Eb')).toEqual({ fifths: -3 });
    expect(parseSpelledPitch('G♯4')).toEqual(parseSpelledPitch('G#4'));
    expect(parseSpelledPitch('A♭3')).toEqual(parseSpelledPitch('Ab3'));
    expect(parseSpelledPitch('F𝄪2')).toEqual(parseSpelledPitch('F##2'));
    expect(parseSpelledPitch('B𝄫5')).toEqual(parseSpelledPitch('Bbb5'));
    expect(parseSpelledPitch('C-1')).toEqual({ fifths: 0, octave: -1 });
    expect(parsePitchClass('Cbbb')).toEqual({ fifths: -21 });
    expect(parsePitchClass('B###')).toEqual({ fifths: 26 });
  });

  it('formats in ASCII by default and in Unicode on request', () => {
    expect(formatSpelledPitch(spelledPitch(pitchClass(8), 4))).toBe('G#4');
    expect(formatSpelledPitch(spelledPitch(pitchClass(-9), 5), { accidentals: 'unicode' })).toBe('B𝄫5');
    expect(formatPitchClass(pitchClass(20), { accidentals: 'unicode' })).toBe('F𝄪♯');
    expect(formatPitchClass(pitchClass(-4), { accidentals: 'unicode' })).toBe('A♭');
  });

  it('refuses bad names with an error that quotes the text and says why', () => {
    expect(() => parseSpelledPitch('H4')).toThrow(/"H4" is not a note name/u);
    expect(() => parseSpelledPitch('G#')).toThrow(/needs an octave/u);
    expect(() => parsePitchClass('G#4')).toThrow(/must not carry an octave/u);
    expect(() => parsePitchClass('C####')).toThrow(/4 sharps; at most 3/u);
    expect(() => parsePitchClass('C#b')).toThrow(/mixes sharps and flats/u);
    expect(() => parseSpelledPitch('')).toThrow(UserError);
  });

  // Cross-check against a general-purpose music-theory library from the registry (@tonaljs/tonal,
  // Note.get): every name from Fbb0 to B##8 must give the same key, letter, alteration and octave.
  it('agrees with @tonaljs/tonal on every name Fbb0…B##8', () => {
    let checked = 0;
    for (let octave = 0; octave <= 8; octave++) {
      for (const letter of ['C', 'D', 'E', 'F', 'G', 'A', 'B'] as Letter[]) {
        for (const accidental of ['bb', 'b', '', '#', '##']) {
          const name = `${letter}${accidental}${octave}`;
          const ours = parseSpelledPitch(name);
          const theirs = Note.get(name);
          expect(keyOf(ours), name).toBe(theirs.midi);
          expect(letterOf(ours)).toBe(theirs.letter);
          expect(alterationOf(ours)).toBe(theirs.alt);
          expect(ours.octave).toBe(theirs.oct);
          expect(chromaOf(ours)).toBe(theirs.chroma);
          expect(formatSpelledPitch(ours)).toBe(theirs.name);
          checked++;
        }
      }
    }
    expect(checked).toBe(9 * 7 * 5);
  });

  it('round-trips: parse(format(p)) = p for every spelling with up to 3 accidentals (property)', () => {
    const pitch = fc.record({ fifths: fc.integer({ min: -22, max: 26 }), octave: fc.integer({ min: -1, max: 9 }) });
    fc.assert(
      fc.property(pitch, fc.constantFrom<'ascii' | 'unicode'>('ascii', 'unicode'), (p, accidentals) => {
        expect(parseSpelledPitch(formatSpelledPitch(p, { accidentals }))).toEqual(p);
      }),
    );
  });
});
