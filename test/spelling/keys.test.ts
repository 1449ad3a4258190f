import { describe, expect, it } from 'vitest';
import { formatRange } from '../../src/pitch/index.js';
import { formatKey, keySignatureOf, keyWindow, parseKey } from '../../src/spelling/keys.js';

describe('declared keys', () => {
  it('parses tonic and mode, with the usual short forms', () => {
    expect(formatKey(parseKey('D minor'))).toBe('D minor');
    expect(formatKey(parseKey('Bb major'))).toBe('Bb major');
    expect(formatKey(parseKey('F♯ dorian'))).toBe('F# dorian');
    expect(formatKey(parseKey('Dm'))).toBe('D minor');
    expect(formatKey(parseKey('g'))).toBe('G major');
    expect(formatKey(parseKey('E PHRYGIAN'))).toBe('E phrygian');
    expect(() => parseKey('H major')).toThrow(/is not a key/u);
    expect(() => parseKey('D dorianish')).toThrow(/unknown mode "dorianish"/u);
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
