import { describe, expect, it } from 'vitest';
import { mpeMaster } from '../../src/router/bend-output.js';
import { formatChannels, parseChannels } from '../../src/text/channels.js';

describe('channel lists', () => {
  it('parses channels as a synth shows them (1–16) into 0–15', () => {
    expect(parseChannels('2-16')).toEqual(Array.from({ length: 15 }, (_, i) => i + 1));
    expect(parseChannels('1,3,5-7')).toEqual([0, 2, 4, 5, 6]);
    expect(parseChannels(' 4 ')).toEqual([3]);
    for (const bad of ['0', '17', '5-3', 'a', '1,,2', '']) expect(() => parseChannels(bad), bad).toThrow(/--channels/u);
  });

  it('formats them back with ranges', () => {
    expect(formatChannels([1, 2, 3, 4])).toBe('2–5');
    expect(formatChannels([0, 2, 4, 5, 6])).toBe('1,3,5–7');
    expect(formatChannels([0, 1])).toBe('1,2');
  });

  it('finds the MPE master of a lower or upper zone (RP-053)', () => {
    expect(mpeMaster([1, 2, 3])).toBe(0);
    expect(mpeMaster([12, 13, 14])).toBe(15);
    expect(() => mpeMaster([2, 3])).toThrow(/MPE layout/u);
  });
});
