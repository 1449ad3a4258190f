import { describe, expect, it } from 'vitest';
import { HomeKey, KEY_NAMES, nameKey, tonicNearest, type Key, type NamingContext } from '../../src/spelling/key-names.js';
import { formatKey, parseKey } from '../../src/spelling/keys.js';
import { pitchClass } from '../../src/pitch/index.js';

// Key names as keyboard music writes them (common practice, no source): within seven sharps or
// flats, a modulation named from the key it leaves; tonics on the line of fifths (C = 0, G = 1 …).
const key = (tonic: number, mode: Key['mode']): Key => ({ tonic, mode });
const at = (current: Key, more: Partial<NamingContext> = {}): NamingContext => ({
  guessing: false,
  current,
  declaredCentre: undefined,
  homeCentre: 2.5, // the E♭..G♯ home window
  region: NaN,
  namingCentre: 4,
  ...more,
});
const C_SHARP_MAJOR = key(7, 'major');
const F_MINOR = key(-1, 'minor');
const A_FLAT_MAJOR = key(-4, 'major');

describe('naming the keys follow finds', () => {
  it('names a new key nearest the key in force: the dominant of C♯ major is G♯ major (eight sharps), of D♭ major A♭', () => {
    expect(nameKey(8, 'major', at(C_SHARP_MAJOR))).toEqual(key(8, 'major'));
    expect(nameKey(8, 'major', at(key(-5, 'major')))).toEqual(key(-4, 'major'));
  });

  it('names the minor subdominant of A♭ major D♭ minor (eight flats), also from its relative F minor, not C♯ minor', () => {
    expect(nameKey(1, 'minor', at(A_FLAT_MAJOR))).toEqual(key(-5, 'minor'));
    expect(nameKey(1, 'minor', at(F_MINOR))).toEqual(key(-5, 'minor'));
  });

  it('while the key is only a guess, names from the naming centre: C♯ major at 4, D♭ major at 0', () => {
    expect(nameKey(1, 'major', at(key(0, 'major'), { guessing: true }))).toEqual(C_SHARP_MAJOR);
    expect(nameKey(1, 'major', at(key(0, 'major'), { guessing: true, namingCentre: 0 }))).toEqual(key(-5, 'major'));
    expect(tonicNearest(key(-5, 'major'), 4)).toBe(7);
    expect(tonicNearest(key(8, 'minor'), 4)).toBe(8); // G♯ minor, not A♭ minor (seven flats)
  });

  it('from a declared remote key names up to eleven accidentals: E♯ major, the dominant of A♯ minor', () => {
    const aSharpMinor = key(10, 'minor');
    expect(nameKey(5, 'major', at(aSharpMinor, { declaredCentre: 10.5 }))).toEqual(key(11, 'major'));
  });
});

describe('the home key', () => {
  it('renames the keys 12 fifths sharpward when a piece held longest in D♭ major was first heard as F minor', () => {
    const home = new HomeKey();
    home.count(4, F_MINOR, false);
    for (let i = 0; i < 40; i++) home.count(4, key(-5, 'major'), false);
    expect(home.shift(at(key(-5, 'major')))).toBe(12);
    // Not when the player declared the key, nor while the key is a guess.
    expect(home.shift(at(key(-5, 'major'), { declaredCentre: -2.5 }))).toBe(0);
    expect(home.shift(at(key(-5, 'major'), { guessing: true }))).toBe(0);
  });

  it('keeps G♯ major in a C♯ major piece whose second half is in the dominant', () => {
    const home = new HomeKey();
    for (let i = 0; i < 10; i++) home.count(4, C_SHARP_MAJOR, false);
    for (let i = 0; i < 100; i++) home.count(4, key(8, 'major'), false);
    expect(home.shift(at(key(8, 'major')))).toBe(0);
  });
});

describe('the two sets of key names', () => {
  // How keyboard music names its keys of five to seven accidentals (from memory): Bach's preludes
  // and fugues in every key use C♯ major and D♯ minor (and E♭ minor once); later music D♭ major and
  // E♭ minor; both F♯ and B major, G♯, C♯ and B♭ minor, A♭ and E♭ major.
  const named = (names: keyof typeof KEY_NAMES, text: string): string => {
    const k = parseKey(text);
    return formatKey({ tonic: pitchClass(tonicNearest({ tonic: k.tonic.fifths, mode: k.mode === 'minor' ? 'minor' : 'major' }, KEY_NAMES[names])), mode: k.mode });
  };
  it('baroque: C♯ major and D♯ minor', () => {
    expect(['Db major', 'Gb major', 'Cb major', 'Ab minor', 'Eb minor', 'A# minor', 'Ab major', 'C# minor'].map((t) => named('baroque', t))).toEqual([
      'C# major', 'F# major', 'B major', 'G# minor', 'D# minor', 'Bb minor', 'Ab major', 'C# minor',
    ]);
  });
  it('later: D♭ major and E♭ minor, the rest alike', () => {
    expect(['C# major', 'Gb major', 'Cb major', 'Ab minor', 'D# minor', 'A# minor', 'Ab major', 'C# minor'].map((t) => named('later', t))).toEqual([
      'Db major', 'F# major', 'B major', 'G# minor', 'Eb minor', 'Bb minor', 'Ab major', 'C# minor',
    ]);
  });
});
