import { Note } from '@tonaljs/tonal';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { loadTuningPreset } from '../../src/presets/tuning-presets.js';
import { centsAboveOrigin } from '../../src/chart/chart.js';
import {
  candidateSpellings,
  DEFAULT_WINDOW,
  parsePitchClass,
  parseSpelledPitch,
  spelledPitch,
  spellKey,
} from '../../src/pitch/index.js';
import {
  A440,
  cents,
  COMMAS,
  divide,
  exactFrequency,
  frequency,
  fromCents,
  intervalFromSpec,
  meantoneFifth,
  parseReference,
  pitchSize,
  regularTuning,
  toFraction,
} from '../../src/tuning/index.js';

const tuning = (id: string) => loadTuningPreset(id).tuning;
const hz = (id: string, ref: string, note: string): number => frequency(tuning(id), parseReference(ref), parseSpelledPitch(note));
const centsFromC = (id: string, pc: string): number => centsAboveOrigin(tuning(id), parsePitchClass(pc));

describe('Pythagorean tuning (facts of the trade; common practice, no source)', () => {
  it('gives G♯ 160.2, A♭ 158.0, C♯ 106.8, D♭ 105.4 Hz from C = 100 Hz', () => {
    // The stated values carry one decimal; D♭ (25600/243 = 105.3498 Hz) was rounded up in the
    // statement, so each is checked to within 0.1 Hz and then exactly by its fraction.
    const stated = { 'G#4': 160.2, Ab4: 158.0, 'C#4': 106.8, Db4: 105.4 };
    for (const [note, value] of Object.entries(stated)) expect(Math.abs(hz('pythagorean', 'C4=100', note) - value), note).toBeLessThan(0.1);
    const exact = (note: string) => exactFrequency(tuning('pythagorean'), parseReference('C4=100'), parseSpelledPitch(note))?.toFraction();
    expect(exact('G#4')).toBe('164025/1024'); // 100 · 3^8/2^12
    expect(exact('Ab4')).toBe('12800/81'); // 100 · 2^7/3^4
    expect(exact('C#4')).toBe('54675/512'); // 100 · 3^7/2^11
    expect(exact('Db4')).toBe('25600/243'); // 100 · 2^8/3^5
  });

  it('reaches 202.7 Hz, not 200, after twelve fifths from 100 Hz; the excess is the comma, exactly', () => {
    const ref = parseReference('C4=100');
    const bSharp = parseSpelledPitch('B#4'); // C + 12 fifths, brought down 6 octaves into C5's octave
    expect(frequency(tuning('pythagorean'), ref, bSharp)).toBeCloseTo(202.7, 1);
    const excess = exactFrequency(tuning('pythagorean'), ref, bSharp)?.div(200);
    expect(excess?.toFraction()).toBe('531441/524288');
  });

  it('puts G♯ exactly a Pythagorean comma above A♭, and makes G♯ over C 6561/4096', () => {
    const t = tuning('pythagorean');
    const diff = divide(pitchSize(t, parseSpelledPitch('G#4')), pitchSize(t, parseSpelledPitch('Ab4')));
    expect(toFraction(diff)?.toFraction()).toBe('531441/524288');
    const gSharp = divide(pitchSize(t, parseSpelledPitch('G#4')), pitchSize(t, parseSpelledPitch('C4')));
    expect(toFraction(gSharp)?.toFraction()).toBe('6561/4096');
  });
});

describe('meantone', () => {
  // Fifth sizes derived from the comma definitions (Barbour 1951), as listed in ../shared/DESIGN.md.
  it.each([
    ['meantone-1-3', 694.786],
    ['meantone-2-7', 695.81],
    ['meantone-1-4', 696.578],
    ['meantone-1-5', 697.654],
    ['meantone-1-6', 698.371],
  ])('%s has a %f-cent fifth', (id, fifth) => {
    expect(centsFromC(id, 'G')).toBeCloseTo(fifth, 3);
    expect(cents(meantoneFifth(id.replace('meantone-', '').replace('-', '/')))).toBeCloseTo(fifth, 3);
  });

  // Quarter-comma degrees in cents from C (Barbour 1951, via ../shared/DESIGN.md).
  it.each([
    ['C#', 76.049],
    ['Db', 117.108],
    ['Eb', 310.265],
    ['D#', 269.206],
    ['G#', 772.627],
    ['Ab', 813.686],
    ['Bb', 1006.843],
  ])('quarter-comma %s is %f cents above C', (pc, expected) => {
    expect(centsFromC('meantone-1-4', pc)).toBeCloseTo(expected, 3);
  });

  it('puts Pythagorean G♯ 815.640 and A♭ 792.180 cents above C (the design notes\' check values)', () => {
    expect(centsFromC('pythagorean', 'G#')).toBeCloseTo(815.64, 3);
    expect(centsFromC('pythagorean', 'Ab')).toBeCloseTo(792.18, 3);
  });

  it('in quarter-comma meantone every sharp lies below its enharmonic flat, by the lesser diesis (common practice, no source)', () => {
    const t = tuning('meantone-1-4');
    for (let key = 21; key <= 108; key++) {
      const [flat, sharp] = candidateSpellings(key, 1).length === 2 ? candidateSpellings(key, 1) : [];
      if (!flat || !sharp) continue;
      const gap = cents(divide(pitchSize(t, sharp), pitchSize(t, flat)));
      expect(gap).toBeLessThan(0);
      expect(gap).toBeCloseTo(-cents(COMMAS.diesis), 9);
    }
  });
});

describe('Werckmeister III', () => {
  // Cents from C (Barbour, Tuning and Temperament, 1951; memory, as listed in ../shared/DESIGN.md).
  const expected = [0, 90.225, 192.18, 294.135, 390.225, 498.045, 588.27, 696.09, 792.18, 888.27, 996.09, 1092.18];
  it('matches the tabulated cents for all 12 keys, and both spellings of a key share them', () => {
    const t = tuning('werckmeister-3');
    expected.forEach((c, chroma) => {
      const pc = spellKey(DEFAULT_WINDOW, 60 + chroma);
      expect(centsAboveOrigin(t, pc)).toBeCloseTo(c, 3);
      for (const other of candidateSpellings(60 + chroma)) {
        expect(cents(divide(pitchSize(t, other), pitchSize(t, parseSpelledPitch('C4'))))).toBeCloseTo(c, 3);
      }
    });
  });
});

describe('other circulating temperaments (cents from C; from memory, cross-checked by their fifth definitions)', () => {
  it.each([
    ['kirnberger-3', [0, 90.225, 193.157, 294.135, 386.314, 498.045, 590.224, 696.578, 792.18, 889.735, 996.09, 1088.269]],
    ['vallotti', [0, 94.135, 196.09, 298.045, 392.18, 501.955, 592.18, 698.045, 796.09, 894.135, 1000, 1090.225]],
    ['young-2', [0, 90.225, 196.09, 294.135, 392.18, 498.045, 588.27, 698.045, 792.18, 894.135, 996.09, 1090.225]],
  ] as const)('%s', (id, table) => {
    table.forEach((c, chroma) => expect(centsAboveOrigin(tuning(id), spellKey(DEFAULT_WINDOW, 60 + chroma))).toBeCloseTo(c, 3));
  });
});

describe('just intonation', () => {
  it('gives exact 5-limit ratios above the tonic and moves with it', () => {
    const t = tuning('just-major');
    const ratioTo = (from: string, to: string, tt = t) =>
      toFraction(divide(pitchSize(tt, parseSpelledPitch(to)), pitchSize(tt, parseSpelledPitch(from))))?.toFraction();
    expect(ratioTo('C4', 'E4')).toBe('5/4');
    expect(ratioTo('C4', 'A4')).toBe('5/3');
    expect(ratioTo('C4', 'D4')).toBe('9/8');
    expect(ratioTo('D4', 'A4')).toBe('40/27'); // the syntonic-comma-narrow fifth of just major (common practice, no source)
    const inD = t.withTonic(parsePitchClass('D'));
    expect(ratioTo('D4', 'A4', inD)).toBe('3/2');
    expect(ratioTo('D4', 'F#4', inD)).toBe('5/4');
    expect(ratioTo('D4', 'C#5', inD)).toBe('15/8');
    // An unlisted spelling is reached from the nearest listed one by pure fifths: E♯ = D♯ (75/64) + 2 fifths.
    expect(ratioTo('C4', 'E#4')).toBe('675/512');
  });

  it('gives exact frequencies when the reference is rational', () => {
    const f = exactFrequency(tuning('just-minor'), parseReference('C4=264'), parseSpelledPitch('Eb4'));
    expect(f?.toFraction()).toBe('1584/5'); // 264 · 6/5
  });
});

describe('regular temperaments (properties)', () => {
  const fifthCents = fc.double({ min: 680, max: 720, noNaN: true });
  const pitch = fc.record({ fifths: fc.integer({ min: -30, max: 30 }), octave: fc.integer({ min: -1, max: 9 }) });

  it('going up a fifth adds the fifth’s size, going up an octave adds 1200 cents', () => {
    fc.assert(
      fc.property(fifthCents, pitch, (phi, p) => {
        const t = regularTuning(fromCents(phi.toFixed(6)));
        const base = cents(pitchSize(t, p));
        const upFifth = cents(pitchSize(t, spelledPitch({ fifths: p.fifths + 1 }, p.octave)));
        const upOctave = cents(pitchSize(t, spelledPitch(p, p.octave + 1)));
        // The fifth above in the same written octave differs from +φ by a whole number of octaves.
        const k = Math.round((upFifth - base - Number(phi.toFixed(6))) / 1200);
        expect(upFifth - base - 1200 * k).toBeCloseTo(Number(phi.toFixed(6)), 6);
        expect(upOctave - base).toBeCloseTo(1200, 6);
      }),
    );
  });

  it('every preset spelling keeps octave equivalence: p an octave up is exactly twice the frequency', () => {
    for (const id of ['pythagorean', 'meantone-1-4', 'edo-31', 'just-major', 'werckmeister-3']) {
      fc.assert(
        fc.property(pitch, (p) => {
          const low = frequency(tuning(id), A440, p);
          const high = frequency(tuning(id), A440, spelledPitch(p, p.octave + 1));
          expect(high / low).toBeCloseTo(2, 9);
        }),
        { numRuns: 50 },
      );
    }
  });

  it('a fifth given as a ratio, tempered by a comma, in cents or as EDO steps means the same size', () => {
    expect(cents(intervalFromSpec({ ratio: '3/2', temper: '-1/4 syntonic' }, 't'))).toBeCloseTo(cents(intervalFromSpec('-1/4 syntonic', 't')), 12);
    expect(cents(intervalFromSpec({ edo: 12 }, 't'))).toBeCloseTo(700, 12);
    expect(cents(intervalFromSpec({ edo: 53, steps: 31 }, 't'))).toBeCloseTo((1200 * 31) / 53, 12);
    expect(cents(intervalFromSpec({ cents: 696.578 }, 't'))).toBeCloseTo(696.578, 12);
  });
});

describe('12-ET against a general-purpose library', () => {
  // @tonaljs/tonal Note.freq (A4 = 440) for all 128 keys, to 1e-9 relative.
  it('matches Note.freq for every MIDI key', () => {
    const t = tuning('edo-12');
    for (let key = 0; key <= 127; key++) {
      const ours = frequency(t, A440, spellKey(DEFAULT_WINDOW, key));
      const theirs = Note.freq(Note.fromMidi(key)) ?? NaN;
      expect(Math.abs(ours / theirs - 1), `key ${key}`).toBeLessThan(1e-9);
    }
  });
});
