import { describe, expect, it } from 'vitest';
import { OUTPUT_DECIMALS, outputNumber, roundSignificant, roundTo } from '../../src/text/output-numbers.js';

describe('numbers at the output boundary', () => {
  it('rounds float noise away and keeps what a reader can use', () => {
    expect(roundTo(175.99999999999997, 6)).toBe(176);
    expect(roundTo(700.0000000000003, 4)).toBe(700);
    expect(roundTo(2.27e-13, 4)).toBe(0);
    expect(roundTo(815.6400069, 4)).toBe(815.64);
    expect(roundTo(160.1806640625, 6)).toBe(160.180664);
    expect(roundTo(-41.05885, 3)).toBe(-41.059);
  });

  it('prints −0 as 0', () => {
    expect(Object.is(roundTo(-2.27e-13, 4), 0)).toBe(true);
    expect(Object.is(roundTo(-0, 4), 0)).toBe(true);
    expect(String(roundTo(-0.00001, 4))).toBe('0');
  });

  it('leaves non-finite values alone', () => {
    expect(roundTo(Number.POSITIVE_INFINITY, 4)).toBe(Number.POSITIVE_INFINITY);
    expect(roundTo(Number.NaN, 4)).toBeNaN();
  });

  it('names the places of each kind of figure', () => {
    expect(OUTPUT_DECIMALS).toEqual({ cents: 4, hz: 6, seconds: 6, milliseconds: 3, beats: 4 });
    expect(outputNumber(1.23456789, 'cents')).toBe(1.2346);
    expect(outputNumber(1.23456789, 'hz')).toBe(1.234568);
  });

  it('rounds a recorded frequency to significant digits, whatever its size', () => {
    expect(roundSignificant(440.00000000000006, 10)).toBe(440);
    // 12-ET middle C at A4 = 440 Hz, 261.6256 Hz in the usual frequency tables (common practice, no source).
    expect(roundSignificant(440 * 2 ** (-9 / 12), 7)).toBe(261.6256);
    expect(roundSignificant(0.018581361171917516, 4)).toBe(0.01858);
    expect(roundSignificant(19_999.99999999, 10)).toBe(20_000);
    expect(Object.is(roundSignificant(-1e-300, 10), -1e-300)).toBe(true); // tiny is not zero: only its digits are cut
    expect(Object.is(roundSignificant(-0, 10), 0)).toBe(true);
    expect(roundSignificant(Number.NaN, 10)).toBeNaN();
  });
});
