import { describe, expect, it } from 'vitest';
import { formatRange } from '../../src/pitch/index.js';
import { formatKey, keySignatureOf, keyWindow, parseKey } from '../../src/spelling/keys.js';

describe('declared keys', () => {
  it('parses tonic and mode, with the usual short forms', () => {
    expect(formatKey(parseKey('D minor'))).toBe('D minor');
    expect(formatKey(parseKey('Bb major'))).toBe('Bb major');
    expect(formatKey(parseKey('F♯ dorian'))).toBe('F# dorian');
    expect(formatKey(parseKey('Dm'))).toBe('D minor');
    expect(formatKey(parseKey('E PHRYGIAN'))).toBe('E phrygian');
    expect(() => parseKey('H major')).toThrow(/is not a key/u);
    expect(() => parseKey('D dorianish')).toThrow(/unknown mode "dorianish"/u);
  });

  // How musicians write keys in prose and on title pages (common practice, no source): a tonic
  // letter with its accidentals, then the mode in words or as "m"; a tonic alone is major.
  it('reads the forms musicians write', () => {
    const cases: Array<[string, string]> = [
      ['D minor', 'D minor'],
      ['d minor', 'D minor'],
      ['Dm', 'D minor'],
      ['Dmin', 'D minor'],
      ['D', 'D major'],
      ['D major', 'D major'],
      ['Dmaj', 'D major'],
      ['F# minor', 'F# minor'],
      ['F#m', 'F# minor'],
      ['Bb major', 'Bb major'],
      ['bb minor', 'Bb minor'],
      ['Bbm', 'Bb minor'],
      ['F♯ minor', 'F# minor'],
      ['B♭ major', 'Bb major'],
      ['E flat major', 'Eb major'],
      ['F sharp minor', 'F# minor'],
      ['  G  Major ', 'G major'],
      // German names, German letters (common practice, no source): B is B♭, H is B, -is raises, -es lowers.
      ['c-moll', 'C minor'],
      ['C dur', 'C major'],
      ['B-dur', 'Bb major'],
      ['b-moll', 'Bb minor'],
      ['H-dur', 'B major'],
      ['h-moll', 'B minor'],
      ['fis-moll', 'F# minor'],
      ['Cis-dur', 'C# major'],
      ['Es-dur', 'Eb major'],
      ['As-dur', 'Ab major'],
      ['Ges-dur', 'Gb major'],
    ];
    for (const [text, expected] of cases) expect(formatKey(parseKey(text)), text).toBe(expected);
    expect(() => parseKey('Fes-dur')).toThrow(/8 flats.*E major/u);
  });

  it('refuses what could be read two ways, listing the accepted forms', () => {
    // "DM" is a D major chord in chord symbols (common practice, no source): never D minor.
    expect(() => parseKey('DM')).toThrow(/"DM" is ambiguous.*"D major" or "D minor"/u);
    expect(() => parseKey('F#M')).toThrow(/ambiguous/u);
    // A lowercase letter alone is minor in some traditions (common practice, no source).
    expect(() => parseKey('d')).toThrow(/"d" is ambiguous.*"D major" or "D minor"/u);
    // "D-" is a D minor chord in chord symbols (common practice, no source): never read as major.
    expect(() => parseKey('D-')).toThrow(/"D-" is ambiguous.*"D minor" or "D major"/u);
    expect(() => parseKey('Bb -')).toThrow(/ambiguous/u);
    expect(() => parseKey('D minr')).toThrow(/unknown mode "minr".*accepted/u);
    expect(() => parseKey('X major')).toThrow(/is not a key.*"Bb major"/u);
  });

  // Signatures of the remote keys (common practice, no source): C♯ major 7 sharps, C♭ major 7 flats,
  // A♯ minor 7 sharps, A♭ minor 7 flats; D♯ major (9 sharps) is written E♭ major.
  it('takes every key up to seven sharps or flats, and names the enharmonic beyond', () => {
    const signature = (text: string) => keySignatureOf(parseKey(text)) + 1;
    expect(signature('C# major')).toBe(7);
    expect(signature('Cb major')).toBe(-7);
    expect(signature('A# minor')).toBe(7);
    expect(signature('Ab minor')).toBe(-7);
    expect(signature('G# minor')).toBe(5);
    expect(signature('D# minor')).toBe(6);
    expect(signature('Gb major')).toBe(-6);
    expect(() => parseKey('D# major')).toThrow(/9 sharps.*write Eb major/u);
    expect(() => parseKey('Fb major')).toThrow(/8 flats.*write E major/u);
    expect(formatRange(keyWindow(parseKey('C# major')))).toBe('E..G##'); // C major's Eb..G# seven fifths sharper
  });

  // Key signatures: sharps positive, flats negative, counted from the flattest fifth of the
  // diatonic set (F for C major); church modes as rotations of the diatonic set (common practice, no source).
  it('places every mode in its diatonic set', () => {
    const signature = (text: string) => keySignatureOf(parseKey(text)) + 1; // +1: number of sharps
    expect(signature('C major')).toBe(0);
    expect(signature('A minor')).toBe(0);
    expect(signature('D dorian')).toBe(0);
    expect(signature('E phrygian')).toBe(0);
    expect(signature('F lydian')).toBe(0);
    expect(signature('G mixolydian')).toBe(0);
    expect(signature('B locrian')).toBe(0);
    expect(signature('D major')).toBe(2);
    expect(signature('C minor')).toBe(-3);
    expect(signature('Bb major')).toBe(-2);
    expect(signature('F# minor')).toBe(3);
  });

  it('gives each key its diatonic notes and the usual inflections', () => {
    expect(formatRange(keyWindow(parseKey('C major')))).toBe('Eb..G#'); // ♭7 ♭3 and ♯4 ♯1 ♯5
    expect(formatRange(keyWindow(parseKey('A minor')))).toBe('Bb..D#'); // ♭2 and ♯6 ♯7 ♯3 ♯4
    expect(formatRange(keyWindow(parseKey('D minor')))).toBe('Eb..G#');
    expect(formatRange(keyWindow(parseKey('C minor')))).toBe('Db..F#');
    expect(formatRange(keyWindow(parseKey('E major')))).toBe('G..B#');
    expect(formatRange(keyWindow(parseKey('D dorian')))).toBe('Eb..G#');
  });
});
