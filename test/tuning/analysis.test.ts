import { describe, expect, it } from 'vitest';
import { parseSpelledPitch } from '../../src/pitch/index.js';
import { loadTuningPreset } from '../../src/presets/tuning-presets.js';
import {
  A440,
  analyseInterval,
  frequency,
  nearestPure,
  PURE_FIFTH_INTERVAL,
  PURE_INTERVALS,
  PURE_MAJOR_THIRD,
  pureCents,
} from '../../src/tuning/index.js';

const et = loadTuningPreset('edo-12').tuning;
const f = (note: string): number => frequency(et, A440, parseSpelledPitch(note));

describe('interval analysis', () => {
  // Piano-tuning practice at A4 = 440 (common practice, no source): the 12-ET fifth A3–E4 beats
  // about 0.74 times a second, the major third C4–E4 about 10.4.
  it('gives 12-ET beat rates of 0.74/s for A3–E4 and 10.4/s for C4–E4', () => {
    const fifth = analyseInterval(f('A3'), f('E4'));
    expect(fifth.pure.interval).toEqual(PURE_FIFTH_INTERVAL);
    expect(fifth.beats).toBeCloseTo(0.74, 2);
    const third = analyseInterval(f('C4'), f('E4'));
    expect(third.pure.interval).toEqual(PURE_MAJOR_THIRD);
    expect(third.beats).toBeCloseTo(10.4, 1);
    expect(third.deviation).toBeCloseTo(13.686, 3); // 400 − 1200·log2(5/4)
  });

  it('finds the nearest pure ratio, octaves folded in', () => {
    const names = (c: number) => {
      const t = nearestPure(c);
      return `${t.interval.p}/${t.interval.q}+${t.octaves}`;
    };
    expect(names(702)).toBe('3/2+0');
    expect(names(1902)).toBe('3/2+1');
    expect(names(969)).toBe('7/4+0');
    expect(names(1199)).toBe('2/1+0');
    expect(names(-5)).toBe('2/1+-1');
    // The required set is present.
    for (const r of ['2/1', '3/2', '4/3', '5/4', '6/5', '5/3', '8/5', '9/8', '15/8', '7/4']) {
      expect(PURE_INTERVALS.map((i) => `${i.p}/${i.q}`)).toContain(r);
    }
  });

  it('is zero beats for a pure interval and counts compound beats against p·2^k/q', () => {
    expect(analyseInterval(200, 300).beats).toBeCloseTo(0, 12);
    const twelfth = analyseInterval(200, 601);
    expect(twelfth.pure.octaves).toBe(1);
    expect(twelfth.beats).toBeCloseTo(1, 9); // |1·601 − 3·200|
    expect(pureCents(PURE_MAJOR_THIRD)).toBeCloseTo(386.3137, 4);
  });

  it('measures a quarter-comma wolf fifth G♯–E♭ 35.7 cents wide (common practice, no source)', () => {
    const mt = loadTuningPreset('meantone-1-4').tuning;
    const wolf = analyseInterval(frequency(mt, A440, parseSpelledPitch('G#4')), frequency(mt, A440, parseSpelledPitch('Eb5')));
    expect(wolf.deviation).toBeCloseTo(35.682, 3);
  });
});
