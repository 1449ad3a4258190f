import Fraction from 'fraction.js';
import { describe, expect, it } from 'vitest';
import { Note } from '@tonaljs/tonal';
import { keyOf, parseSpelledPitch } from '../../src/pitch/index.js';
import { checkTuningPreset, loadTuningPreset } from '../../src/presets/tuning-presets.js';
import { frequency, reference } from '../../src/tuning/index.js';
import { AdaptiveTuner, consonanceDeviation, measurePurity, synthOffset, tonicDrift, type SoundingEvent } from '../../src/tuning/adaptive/index.js';
import { runCli } from '../cli/run-cli.js';

// Just ratios and the 12-ET fifth of 700 cents: common practice, no source.
const cents = (ratio: string): number => 1200 * Math.log2(new Fraction(ratio).valueOf());
const P = parseSpelledPitch;

describe('the purity measure (time, Hz, on/off events)', () => {
  it('measures a pure major third as 0 and a 12-ET fifth as 1.955 cents narrow', () => {
    expect(consonanceDeviation({ hz: 220, pitch: P('A3') }, { hz: 275, pitch: P('C#4') })).toEqual({ family: 'major third/minor sixth', deviation: expect.closeTo(0, 9) });
    const fifth = consonanceDeviation({ hz: 220 }, { hz: 220 * 2 ** (7 / 12) });
    expect(fifth?.family).toBe('fifth/fourth');
    expect(fifth?.deviation).toBeCloseTo(700 - cents('3/2'), 9);
    // a compound interval counts as its simple form: a minor tenth at 12/5
    expect(consonanceDeviation({ hz: 100, pitch: P('C3') }, { hz: 240, pitch: P('Eb4') })?.deviation).toBeCloseTo(0, 9);
  });

  it('takes the spelling for what an interval is: G♯–C at 5/4 is a diminished fourth, not a third', () => {
    const gs = { hz: 400, pitch: P('G#4') };
    const c = { hz: 500, pitch: P('C5') };
    expect(consonanceDeviation(gs, c)).toBeUndefined();
    expect(consonanceDeviation({ hz: gs.hz }, { hz: c.hz })?.family).toBe('major third/minor sixth'); // unspelled: by size
  });

  it('counts each interval once as it forms, and every move of a sounding note', () => {
    const events: SoundingEvent[] = [
      { kind: 'on', time: 0, id: 1, hz: 200, pitch: P('G3') },
      { kind: 'on', time: 0, id: 2, hz: 300, pitch: P('D4') }, // pure fifth
      { kind: 'on', time: 0, id: 3, hz: 250, pitch: P('B3') }, // pure third over G, 6/5 under D
      { kind: 'change', time: 10, id: 2, hz: 300 * 2 ** (-10 / 1200) }, // D moves 10 cents down
      { kind: 'off', time: 20, id: 1 },
      { kind: 'off', time: 20, id: 2 },
      { kind: 'off', time: 20, id: 3 },
    ];
    const report = measurePurity(events);
    expect(report.moved).toBe(1);
    expect(report.notes).toBe(3);
    expect(report.byFamily['fifth/fourth'].count).toBe(2);
    expect(report.byFamily['fifth/fourth'].meanAbs).toBeCloseTo(5, 9); // 0, then 10
    expect(report.byFamily['minor third/major sixth'].maxAbs).toBeCloseTo(10, 9);
    expect(report.byFamily['major third/minor sixth'].meanAbs).toBeCloseTo(0, 9);
  });

  it('counts an interval once per distinct pitch: a unison doubling or a note struck again at its pitch adds none', () => {
    const fifthAbove = 200 * 2 ** (cents('3/2') / 1200);
    const events: SoundingEvent[] = [
      { kind: 'on', time: 0, id: 1, hz: 200, pitch: P('G3') },
      { kind: 'on', time: 0, id: 2, hz: fifthAbove, pitch: P('D4') },
      { kind: 'on', time: 0, id: 3, hz: fifthAbove, pitch: P('D4') }, // a second part in unison
      { kind: 'off', time: 10, id: 2 }, // one part re-strikes its D at the same pitch
      { kind: 'on', time: 10, id: 4, hz: fifthAbove, pitch: P('D4') },
      { kind: 'on', time: 20, id: 5, hz: 250, pitch: P('B3') }, // a new pitch: 5/4 over G, 6/5 under D
    ];
    const report = measurePurity(events);
    expect(report.notes).toBe(5);
    expect(report.byFamily['fifth/fourth'].count).toBe(1);
    expect(report.byFamily['major third/minor sixth'].count).toBe(1);
    expect(report.byFamily['minor third/major sixth'].count).toBe(1);
    expect(report.all.meanAbs).toBeCloseTo(0, 9);
  });

  it('measures the drift of the tonic where it sounds in the bass, whichever part sounds it', () => {
    const comma = cents('81/80');
    const events: SoundingEvent[] = [
      { kind: 'on', time: 0, id: 1, hz: 130, pitch: P('C3') },
      { kind: 'off', time: 1, id: 1 },
      { kind: 'on', time: 2, id: 2, hz: 100, pitch: P('G2') },
      { kind: 'on', time: 2, id: 3, hz: 260 * 2 ** (30 / 1200), pitch: P('C4') }, // not in the bass: a chord's fifth may stand off
      { kind: 'off', time: 3, id: 2 },
      { kind: 'off', time: 3, id: 3 },
      // the last C in the bass, doubled in unison by two parts, a comma down
      { kind: 'on', time: 4, id: 4, hz: 65 * 2 ** (-comma / 1200), pitch: P('C2') },
      { kind: 'on', time: 4, id: 5, hz: 65 * 2 ** (-comma / 1200), pitch: P('C2') },
      { kind: 'on', time: 4, id: 6, hz: 65 * 2 * 2 ** (-comma / 1200), pitch: P('C3') },
    ];
    expect(tonicDrift(events, P('C3').fifths)).toBeCloseTo(-comma, 9);
    expect(tonicDrift(events, P('F3').fifths)).toBeUndefined();
  });
});

describe('just-adaptive presets and chart', () => {
  const base = { name: 'x', kind: 'just-adaptive', description: 'd', source: 's', degrees: { C: '1/1', E: '5/4', G: '3/2' } };
  const problemsOf = (json: unknown) => checkTuningPreset(JSON.stringify(json), 'mine.json').problems.map((p) => `${p.path}: ${p.message}`);

  it('accepts a table with adaptive settings and names the path of a bad one', () => {
    expect(problemsOf({ ...base, adaptive: { limit: 7, anchor: 2, phraseGapMs: 500 } })).toEqual([]);
    expect(problemsOf({ ...base, adaptive: { limit: 6 } })).toEqual(['$.adaptive.limit: must be 5 or 7']);
    expect(problemsOf({ ...base, adaptive: { anchor: -1 } })[0]).toMatch(/^\$\.adaptive\.anchor: /u);
    expect(problemsOf({ ...base, adaptive: { wobble: 1 } })[0]).toMatch(/^\$\.adaptive: /u);
  });

  it('diesis chart just-adaptive says that pitches follow the harmony and what its table is', async () => {
    const text = await runCli('chart', 'just-adaptive', '--ascii');
    expect(text.code).toBe(0);
    expect(text.stdout).toMatch(/Pitches follow the harmony/u);
    expect(text.stdout).toMatch(/fixed 5-limit just table/u);
    const json = await runCli('chart', 'just-adaptive', '--json');
    const parsed = JSON.parse(json.stdout) as { tuning: { kind: string }; adaptive: { explanation: string; settings: { limit: number } } };
    expect(parsed.tuning.kind).toBe('just-adaptive');
    expect(parsed.adaptive.settings.limit).toBe(5);
    expect(parsed.adaptive.explanation).toMatch(/follow the harmony/u);
  });
});

describe('synthOffset', () => {
  it('splits an adapted note into a key shift and a rest within ±50 cents of the synth’s 12-ET', () => {
    const table = loadTuningPreset('just-adaptive').tuning;
    const ref = reference(P('A4'), 415);
    const tuner = new AdaptiveTuner({ table, reference: ref });
    // chords from silence whose notes the table has pure among themselves sit on the table
    const f = tuner.chordOn(0, ['F3', 'A3', 'C4', 'A5'].map((n, id) => ({ id, pitch: P(n) })));
    for (const n of f) tuner.noteOff(100, n.id);
    const e = tuner.chordOn(1000, ['E2', 'G#4', 'B4', 'E5'].map((n, id) => ({ id: 10 + id, pitch: P(n) })));
    for (const note of [...f, ...e]) {
      expect(note.hz).toBeCloseTo(frequency(table, ref, note.pitch), 7);
      const offset = synthOffset(note.pitch, note.hz, 440);
      // the synth's 12-ET key at A4 = 440 from @tonaljs/tonal (a registry library), not from the project
      const et = Note.freq(Note.fromMidi(keyOf(note.pitch) + offset.keyShift));
      expect(et).not.toBeNull();
      expect(offset.residual).toBeCloseTo(1200 * Math.log2(note.hz / et!), 9);
      expect(Math.abs(offset.residual)).toBeLessThanOrEqual(50);
    }
  });
});
