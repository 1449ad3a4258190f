import { describe, expect, it } from 'vitest';
import { formatRange } from '../../src/pitch/index.js';
import { checkSetup } from '../../src/presets/setup-file.js';
import { createStrategy } from '../../src/spelling/strategy.js';
import { play } from './pieces.js';

const check = (follow: object) => checkSetup(JSON.stringify({ spelling: { strategy: 'follow', follow } }), 'setup.json');

describe('the setup steers follow', () => {
  it('takes a home window, its strength and the time constants', () => {
    const { setup, problems } = check({ homeWindow: 'Ab..C#', homeStrength: 0.3, halfLifeMs: 3000, localHalfLifeMs: 800, localShare: 0.5, chordCompactness: 0.6 });
    expect(problems).toEqual([]);
    const follow = setup!.json.spelling!.follow!;
    expect(formatRange(follow.homeWindow!)).toBe('Ab..C#');
    expect(follow.homeStrength).toBe(0.3);
  });

  it('refuses a home window that is not 12 fifths, and values out of range, each with its path', () => {
    const { problems } = check({ homeWindow: 'Eb..G', homeStrength: 2, localShare: -1 });
    const text = problems.map((p) => `${p.path}: ${p.message}`);
    expect(text.some((t) => t.includes('homeWindow') && t.includes('holds 5 spellings'))).toBe(true);
    expect(text.some((t) => t.includes('homeStrength'))).toBe(true);
    expect(text.some((t) => t.includes('localShare'))).toBe(true);
  });

  it('a strong home prior keeps passing chromaticism in the home window', () => {
    // A G major passage with a chromatic G♯ neighbour and a D♯ passing note, the kind of thing an
    // early-Baroque piece does in its home window (E♭..G♯ holds G♯ and E♭, not D♯).
    const passage = [['G3', 'B3', 'D4'], ['G#3'], ['A3'], ['D3', 'F#3', 'A3'], ['D#4'], ['E4'], ['G3', 'B3', 'D4']];
    const home = check({ homeWindow: 'Eb..G#', homeStrength: 1 }).setup!.json.spelling!.follow!;
    const strong = createStrategy({ strategy: 'follow', follow: home });
    const spelled = play(strong, passage).flat();
    // Every note stays in the home window: D♯ comes out as E♭ (the window's spelling).
    expect(spelled).toEqual(['G3', 'B3', 'D4', 'G#3', 'A3', 'D3', 'F#3', 'A3', 'Eb4', 'E4', 'G3', 'B3', 'D4']);
  });
});
