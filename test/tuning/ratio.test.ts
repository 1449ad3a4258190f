import Fraction from 'fraction.js';
import { describe, expect, it } from 'vitest';
import {
  cents,
  COMMAS,
  divide,
  formatRatio,
  fromCents,
  intervalFromSpec,
  isRational,
  multiply,
  power,
  ratio,
  ratioEquals,
  toFraction,
  value,
} from '../../src/tuning/index.js';

describe('exact ratios', () => {
  it('keeps products, quotients and powers exact', () => {
    const fifth = ratio('3/2');
    // (3/2)^12 / 2^7 is the Pythagorean comma 531441/524288 (Barbour, Tuning and Temperament, 1951; memory).
    const comma = divide(power(fifth, 12), power(ratio(2), 7));
    expect(toFraction(comma)?.equals(new Fraction(531441, 524288))).toBe(true);
    expect(ratioEquals(comma, COMMAS.pythagorean)).toBe(true);
    // Pythagorean G♯ over C: 8 fifths down 4 octaves = 6561/4096 (arithmetic of the definition).
    expect(toFraction(divide(power(fifth, 8), power(ratio(2), 4)))?.toFraction()).toBe('6561/4096');
    expect(formatRatio(multiply(ratio('5/4'), ratio('6/5')))).toBe('3/2');
  });

  it('represents tempered sizes exactly: quarter-comma meantone’s fifth is 5^(1/4)', () => {
    const fifth = intervalFromSpec('-1/4 syntonic', 'test');
    expect(isRational(fifth)).toBe(false);
    expect(toFraction(fifth)).toBeUndefined();
    expect(formatRatio(fifth)).toBe('5^(1/4)');
    expect(toFraction(power(fifth, 4))?.toFraction()).toBe('5');
    expect(formatRatio(intervalFromSpec({ edo: 31 }, 'test'))).toBe('2^(18/31)');
  });

  // Comma sizes in cents to 0.001 (Barbour, Tuning and Temperament, 1951; memory, as quoted in ../shared/DESIGN.md).
  it.each([
    ['pythagorean', 23.46],
    ['syntonic', 21.506],
    ['diesis', 41.059],
  ] as const)('the %s comma is %f cents', (name, expected) => {
    expect(cents(COMMAS[name])).toBeCloseTo(expected, 3);
  });

  it('converts cents exactly and values as floats', () => {
    expect(cents(fromCents('696.578'))).toBeCloseTo(696.578, 9);
    expect(value(ratio('3/2'))).toBe(1.5);
    expect(value(fromCents(1200))).toBe(2);
    expect(() => ratio('-3/2')).toThrow(RangeError);
  });
});
