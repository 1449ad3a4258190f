import { describe, expect, it } from 'vitest';
import { formatSpelledPitch, keyOf, parseSpelledPitch } from '../../src/pitch/index.js';
import { spellTake, type TakeEvent } from '../../bench/accuracy.js';
import { FollowSpeller } from '../../src/spelling/follow.js';
import { parseKey } from '../../src/spelling/keys.js';
import { createStrategy } from '../../src/spelling/strategy.js';
import { CADENCE_IN_C_SHARP_MAJOR, F_MINOR_AFTER_A_MINOR, play, REMOTE_KEY_PIECES } from './pieces.js';

const declared = (key: string) => createStrategy({ strategy: 'follow', key: parseKey(key) });
const undeclared = () => createStrategy({ strategy: 'follow' });

describe('follow: remote keys, spelled from the first bar', () => {
  for (const piece of REMOTE_KEY_PIECES) {
    it(`${piece.name}, with --key "${piece.key}"`, () => {
      expect(play(declared(piece.key), piece.chords)).toEqual(piece.chords);
    });
    it(`${piece.name}, without --key`, () => {
      expect(play(undeclared(), piece.chords)).toEqual(piece.chords);
    });
  }

  it('names a remote key by the key it comes from: the C♯ cadence after A♭ major is a D♭ cadence', () => {
    // The same keys after four bars of A♭ major (4 flats): D♭ major (5 flats) is the near name.
    const speller = declared('Ab major');
    play(speller, [['Ab2', 'C4', 'Eb4', 'Ab4'], ['Db3', 'F4', 'Ab4', 'Db5'], ['Eb3', 'G4', 'Bb4', 'Db5'], ['Ab2', 'C4', 'Eb4', 'Ab4']]);
    const flat = CADENCE_IN_C_SHARP_MAJOR.chords.slice(0, 5);
    expect(play(speller, flat, 500, 2000)).toEqual([
      ['Db3', 'F4', 'Ab4', 'Db5'],
      ['Gb3', 'Gb4', 'Bb4', 'Db5'],
      ['Gb3', 'Eb4', 'Bb4', 'Eb5'],
      ['Ab2', 'C4', 'Gb4', 'Eb5'],
      ['Db3', 'Db4', 'F4', 'Ab4'],
    ]);
  });

  it('with --key "Db major" the same cadence is spelled in D♭', () => {
    expect(play(declared('Db major'), CADENCE_IN_C_SHARP_MAJOR.chords.slice(0, 2))).toEqual([
      ['Db3', 'F4', 'Ab4', 'Db5'],
      ['Gb3', 'Gb4', 'Bb4', 'Db5'],
    ]);
  });

  it('leaves a remote key: seven sharps, then C major again, F is F', () => {
    const speller = new FollowSpeller();
    play(speller, CADENCE_IN_C_SHARP_MAJOR.chords);
    const home = [['C3', 'E4', 'G4'], ['F3', 'F4', 'A4', 'C5'], ['G2', 'B3', 'F4', 'D5'], ['C3', 'E4', 'G4', 'C5']];
    const out = play(speller, [...home, ...home], 500, 10_000);
    expect(out.slice(4)).toEqual(home);
  });
});

describe('follow: chords spelled as chords', () => {
  it('an F minor chord after A minor is F–A♭–C, not F–C–G♯', () => {
    expect(play(new FollowSpeller(), F_MINOR_AFTER_A_MINOR.chords)).toEqual(F_MINOR_AFTER_A_MINOR.chords);
  });

  it('a held note does not make a newly struck chord ugly', () => {
    // E major's G♯ held as a pedal while an F minor chord is struck above: the new chord is F–A♭–C.
    const speller = new FollowSpeller();
    play(speller, [['E3', 'G#3', 'B3'], ['B2', 'D#3', 'F#3', 'A3'], ['E3', 'G#3', 'B3']]);
    const pedal = { key: 56, velocity: 80, time: 2000, channel: 0, source: 0 }; // G♯3, still held below
    speller.spell([pedal]);
    const chord = [65, 68, 72].map((key) => ({ key, velocity: 80, time: 2500, channel: 1, source: 0 }));
    const [root, third, fifth] = speller.spell(chord).map((p) => p.fifths);
    // A minor triad on the line of fifths: the fifth one step above the root, the minor third three
    // below (F C A♭: −1 0 −4, or E♯ B♯ G♯: 11 12 8), never F–G♯–C (common practice, no source).
    expect(fifth! - root!).toBe(1);
    expect(third! - root!).toBe(-3);
  });

  it('spells a diminished seventh chord with one letter per third, as written in the key', () => {
    // C minor: the diminished seventh on B (B D F A♭) resolves to C minor (common practice, no source).
    const out = play(createStrategy({ strategy: 'follow', key: parseKey('C minor') }), [
      ['C3', 'Eb4', 'G4', 'C5'],
      ['B2', 'D4', 'F4', 'Ab4'],
      ['C3', 'Eb4', 'G4', 'C5'],
    ]);
    expect(out[1]).toEqual(['B2', 'D4', 'F4', 'Ab4']);
  });
});

describe('follow: remote keys played, chords arriving over 30 ms', () => {
  /** The piece's chords with their notes 10 ms apart (top note first), each held until the next chord. */
  function takeOf(chords: readonly (readonly string[])[]): TakeEvent[] {
    return chords
      .flatMap((chord, c) =>
        [...chord].reverse().flatMap((name, i) => {
          const key = keyOf(parseSpelledPitch(name));
          const id = c * 16 + i;
          return [
            { time: c * 500 + i * 10, on: true, id, key, channel: 0, velocity: 80 },
            { time: c * 500 + 495, on: false, id, key, channel: 0, velocity: 0 },
          ];
        }),
      )
      .sort((a, b) => a.time - b.time || Number(a.on) - Number(b.on));
  }

  for (const piece of REMOTE_KEY_PIECES) {
    it(`${piece.name}, gathered over 40 ms, without --key`, () => {
      const spelled = spellTake(takeOf(piece.chords), undeclared(), 40);
      const out = piece.chords.map((chord, c) => [...chord].reverse().map((_, i) => formatSpelledPitch(spelled.get(c * 16 + i)!)).reverse());
      expect(out).toEqual(piece.chords);
    });
  }
});

describe('follow: one early note does not decide the key', () => {
  it('a B major opening whose notes arrive 8 ms apart, spelled one by one, stays in B major, not C♭', () => {
    const chords = [
      ['B2', 'D#4', 'F#4', 'B4'], // I
      ['E3', 'G#4', 'B4', 'E5'], // IV
      ['F#3', 'A#4', 'C#5', 'E5'], // V7
      ['B2', 'D#4', 'F#4', 'B4'], // I
      ['G#2', 'D#4', 'G#4', 'B4'], // vi
      ['F#3', 'A#4', 'C#5', 'E5'], // V7
      ['B2', 'D#4', 'F#4', 'B4'], // I
    ];
    const events: TakeEvent[] = chords
      .flatMap((chord, c) =>
        chord.flatMap((name, i) => {
          const key = keyOf(parseSpelledPitch(name));
          return [
            { time: c * 500 + i * 8, on: true, id: c * 16 + i, key, channel: 0, velocity: 80 },
            { time: c * 500 + 495, on: false, id: c * 16 + i, key, channel: 0, velocity: 0 },
          ];
        }),
      )
      .sort((a, b) => a.time - b.time || Number(a.on) - Number(b.on));
    const spelled = spellTake(events, undeclared(), 0);
    const out = chords.map((chord, c) => chord.map((_, i) => formatSpelledPitch(spelled.get(c * 16 + i)!)));
    // The B heard first draws the centre sharpward, so D♯ is D♯ already in the first chord.
    expect(out).toEqual(chords);
  });
});
