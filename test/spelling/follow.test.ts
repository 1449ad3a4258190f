import { describe, expect, it } from 'vitest';
import { DEFAULT_FOLLOW, FollowSpeller, signatureOf, windowCentreOf } from '../../src/spelling/follow.js';
import { KEY_NAMES } from '../../src/spelling/key-names.js';
import { keySignatureOf, keyWindow, parseKey } from '../../src/spelling/keys.js';
import { createStrategy } from '../../src/spelling/strategy.js';
import { play } from './pieces.js';

const follow = () => new FollowSpeller();

describe('follow: spelling from the harmony heard', () => {
  it('spells the leading tone of a cadence in A minor as G♯', () => {
    // i – iv – V – i, written with the enharmonics a keyboard cannot show: the key number is what counts.
    const out = play(follow(), [['A3', 'C4', 'E4'], ['D3', 'F4', 'A4'], ['E3', 'Ab4', 'B4'], ['A3', 'C4', 'E4']]);
    expect(out[2]).toEqual(['E3', 'G#4', 'B4']);
  });

  it('spells the same key as A♭ in C minor', () => {
    const out = play(follow(), [['C3', 'Eb4', 'G4'], ['F3', 'Ab4', 'C5'], ['G3', 'B4', 'D5'], ['C3', 'Eb4', 'G4'], ['F3', 'G#4', 'C5']]);
    expect(out[1]).toEqual(['F3', 'Ab4', 'C5']);
    expect(out[4]).toEqual(['F3', 'Ab4', 'C5']);
    expect(out[2]).toEqual(['G3', 'B4', 'D5']);
  });

  it('gives an E major triad G♯, and an opening C♯/D♭ major triad the names chosen: C♯ (baroque) or D♭ (later)', () => {
    expect(play(follow(), [['E3', 'Ab3', 'B3'], ['E3', 'Ab3', 'B3']])[1]).toEqual(['E3', 'G#3', 'B3']);
    // An opening chord, before any key is found, is spelled around the keys that fit it, named as
    // chosen (the two sets of key names: common practice, from memory); it used to be D♭ either way.
    expect(play(follow(), [['C#3', 'F3', 'G#3']])).toEqual([['C#3', 'E#3', 'G#3']]);
    const later = new FollowSpeller({ ...DEFAULT_FOLLOW, namingCentre: KEY_NAMES.later });
    expect(play(later, [['C#3', 'F3', 'G#3'], ['C#4', 'F4', 'G#4']])).toEqual([['Db3', 'F3', 'Ab3'], ['Db4', 'F4', 'Ab4']]);
  });

  it('spells a lament bass in D minor with the raised seventh and the minor sixth', () => {
    const speller = follow();
    play(speller, [['D3', 'F4', 'A4'], ['A2', 'E4', 'C#5'], ['D3', 'F4', 'A4']]);
    const line = play(speller, [['D3'], ['Db3'], ['C3'], ['B2'], ['A#2'], ['A2']], 400).map((c) => c[0]);
    expect(line).toEqual(['D3', 'C#3', 'C3', 'B2', 'Bb2', 'A2']);
  });

  it('is dragged along by a modulation round the circle of fifths, and back', () => {
    const speller = follow();
    const cadence = (tonic: string, third: string, fifth: string, dom: string, leading: string, domFifth: string) => [
      [tonic, third, fifth],
      [dom, leading, domFifth],
      [tonic, third, fifth],
    ];
    // C, G, D, A, E, B, F♯ major, each by its own V–I: the sharps pile up, E♯ appears in F♯.
    const keys: Array<[string, string, string, string, string, string]> = [
      ['C3', 'E3', 'G3', 'G2', 'B2', 'D3'],
      ['G3', 'B3', 'D4', 'D3', 'F#3', 'A3'],
      ['D3', 'F#3', 'A3', 'A2', 'C#3', 'E3'],
      ['A2', 'C#3', 'E3', 'E2', 'G#2', 'B2'],
      ['E3', 'G#3', 'B3', 'B2', 'D#3', 'F#3'],
      ['B2', 'D#3', 'F#3', 'F#2', 'A#2', 'C#3'],
      ['F#3', 'A#3', 'C#4', 'C#3', 'E#3', 'G#3'],
    ];
    let last: string[][] = [];
    for (const k of keys) last = play(speller, cadence(...k));
    expect(last[1]).toEqual(['C#3', 'E#3', 'G#3']);
    expect(last[2]).toEqual(['F#3', 'A#3', 'C#4']);
    // Back home: a few bars of C major and F is F again, not E♯.
    for (let i = 0; i < 4; i++) last = play(speller, cadence(...keys[0]!));
    expect(play(speller, [['F3', 'A3', 'C4']])[0]).toEqual(['F3', 'A3', 'C4']);
  });

  it('renames the keys once a piece first heard in its mediant has shown its home key, C♯ major', () => {
    // Our own piece: iii–vi–iii (E♯ minor, named F minor: E♯ minor would take eight sharps), then
    // ii–V–I–IV–V7–I in C♯ major five times. C♯ major is named from the naming centre (common
    // practice of keyboard music in the sharpest keys, no source), and the keys named so far are
    // renamed with it: the last cadence is spelled in sharps, not in D♭ major.
    const opening = [['E#3', 'G#3', 'B#3', 'E#4'], ['A#2', 'A#3', 'C#4', 'E#4'], ['E#3', 'G#3', 'B#3', 'G#4']];
    const cadence = [['D#3', 'F#3', 'A#3', 'D#4'], ['G#2', 'B#3', 'D#4', 'G#4'], ['C#3', 'E#3', 'G#3', 'C#4'], ['F#3', 'A#3', 'C#4', 'F#4'], ['G#2', 'B#3', 'F#4', 'D#4'], ['C#3', 'E#3', 'G#3', 'C#4']];
    const out = play(follow(), [...opening, ...cadence, ...cadence, ...cadence, ...cadence, ...cadence]);
    expect(out[0]).toEqual(['F3', 'Ab3', 'C4', 'F4']);
    expect(out.slice(-6)).toEqual(cadence);
  });

  it('keeps A♭ major through its minor subdominant and flat submediant: D♭ minor and F♭ major, not C♯ minor and E major', () => {
    // Our own phrase in A♭ major: I–IV–iv–I–♭VI–V7–I, the mixture chords written in flats (common
    // practice, no source). Without the flat keys past seven (D♭ minor has eight flats) the minor
    // subdominant was read as C♯ minor and the phrase went on in G♯ major.
    const phrase = [
      ['Ab2', 'C4', 'Eb4', 'Ab4'],
      ['Db3', 'F4', 'Ab4', 'Db5'],
      ['Db3', 'Fb4', 'Ab4', 'Cb5'],
      ['Fb5'],
      ['Ab2', 'C4', 'Eb4', 'Eb5'],
      ['Fb3', 'Ab3', 'Cb4', 'Fb4'],
      ['Eb3', 'G3', 'Bb3', 'Db4'],
      ['Ab2', 'C4', 'Eb4', 'Ab4'],
    ];
    expect(play(follow(), phrase)).toEqual(phrase);
  });

  it('keeps a declared A♯ minor through its dominant, E♯ major with eleven sharps: G𝄪, not A', () => {
    // Our own phrase in A♯ minor: i–iv–V7, the dominant spun out, V–i, twice; the leading tone G𝄪
    // (common practice, no source).
    const speller = follow();
    speller.setKey(parseKey('A# minor'));
    const phrase = [
      ['A#2', 'C#4', 'E#4', 'A#4'],
      ['D#3', 'F#4', 'A#4', 'D#5'],
      ['E#3', 'G##3', 'B#3', 'D#4'],
      ['B#4'], ['G##4'], ['E#4'], ['G##4'], ['B#4'], ['D#5'],
      ['E#3', 'G##3', 'B#3', 'E#4'],
      ['A#2', 'C#4', 'E#4', 'A#4'],
    ];
    expect(play(speller, [...phrase, ...phrase])).toEqual([...phrase, ...phrase]);
  });

  it('spells a chromatic lower neighbour reached by a falling semitone as the raised letter below', () => {
    // Our own phrase in C major: a tune that dips from E to the note below and back (E–D♯–E), the
    // way a chromatic neighbour is written (common practice, no source); the same key reached by a
    // leap stays E♭, the chromatic third of C minor.
    const speller = follow();
    play(speller, [['C3', 'E4', 'G4'], ['F3', 'A4', 'C5'], ['G3', 'B4', 'D5'], ['C3', 'E4', 'G4']]);
    expect(play(speller, [['E5'], ['Eb5'], ['E5']], 250).map((c) => c[0])).toEqual(['E5', 'D#5', 'E5']);
    const other = follow();
    play(other, [['C3', 'E4', 'G4'], ['F3', 'A4', 'C5'], ['G3', 'B4', 'D5'], ['C3', 'E4', 'G4']]);
    expect(play(other, [['C5'], ['D#5'], ['D5']], 250).map((c) => c[0])).toEqual(['C5', 'Eb5', 'D5']);
  });

  it('remembers how a chromatic note moved on: a figure that returns takes the same spelling', () => {
    // Our own figure in C major: G–(D♯/E♭)–E, the middle note reached by a leap. Heard first, it
    // can only be spelled from the key (E♭, the nearer); once it has gone up to E it was a leading
    // tone, and when the figure returns it is D♯ (common practice, no source).
    const speller = follow();
    play(speller, [['C3', 'E4', 'G4'], ['F3', 'A4', 'C5'], ['G3', 'B4', 'D5'], ['C3', 'E4', 'G4']]);
    const figure = () => play(speller, [['G4'], ['D#5'], ['E5']], 250).map((c) => c[0]);
    expect(figure()).toEqual(['G4', 'Eb5', 'E5']);
    expect(figure()).toEqual(['G4', 'D#5', 'E5']);
  });

  it('keeps its key when frozen, and jumps when told a key', () => {
    const speller = follow();
    speller.setKey(parseKey('Eb major'));
    expect(play(speller, [['Ab3']])[0]).toEqual(['Ab3']);
    speller.setFrozen(true);
    play(speller, Array.from({ length: 20 }, () => ['E3', 'G#3', 'B3']));
    expect(play(speller, [['Ab3']])[0]).toEqual(['Ab3']);
    speller.setFrozen(false);
    play(speller, Array.from({ length: 20 }, () => ['E3', 'G#3', 'B3']));
    expect(play(speller, [['Ab3']])[0]).toEqual(['G#3']);
  });
});

describe('follow: keys on the line of fifths', () => {
  it('places every key as keys.ts does (signature and window)', () => {
    for (let tonic = -12; tonic <= 12; tonic++) {
      for (const mode of ['major', 'minor'] as const) {
        const declared = { tonic: { fifths: tonic }, mode };
        expect(signatureOf({ tonic, mode })).toBe(keySignatureOf(declared));
        expect(windowCentreOf({ tonic, mode })).toBe(keyWindow(declared).lowest + 5.5);
      }
    }
  });
});

describe('fixed and key strategies', () => {
  it('fixed: one window, whatever is played', () => {
    const speller = createStrategy({ strategy: 'fixed' });
    expect(play(speller, [['C#4', 'G#4', 'D#4', 'A#4']])[0]).toEqual(['C#4', 'G#4', 'Eb4', 'Bb4']);
  });

  it('key: the declared key’s window, and its tonic for just intonation', () => {
    const speller = createStrategy({ strategy: 'key', key: parseKey('F# minor') });
    expect(play(speller, [['E#4', 'D4', 'A#4', 'B#4']])[0]).toEqual(['E#4', 'D4', 'A#4', 'B#4']);
    expect(speller.currentTonic()).toEqual({ fifths: 6 });
  });
});
