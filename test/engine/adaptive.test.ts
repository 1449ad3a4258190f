import { describe, expect, it } from 'vitest';
import { parseSpelledPitch, type SpelledPitch } from '../../src/pitch/index.js';
import { loadTuningPreset } from '../../src/presets/tuning-presets.js';
import type { ModelVoice } from '../../src/synth/reference-synth.js';
import { A440 } from '../../src/tuning/index.js';
import { Rig } from '../support/rig.js';
import { scriptedSpeller } from '../support/spellers.js';

// Pure ratios of just intonation (common practice, no source): fifth 3/2, major third 5/4,
// minor third 6/5. Cents are computed here from the ratios, never taken from the engine.
const cents = (ratio: number): number => 1200 * Math.log2(ratio);
const adaptive = loadTuningPreset('just-adaptive').tuning;
/** Drift control off within a phrase: every new note pure against what sounds. */
const pureNow = loadTuningPreset('just-adaptive-pure').tuning;
/** Half a bend step at ±2 semitones (100·2/8192/2 cent, MIDI 1.0 bend scaling), plus rounding. */
const BEND = 0.02;

/** A rig on the multitimbral layout (±2, the finest bend step), spelled by a table of names. */
function rig(names: Record<number, string>, mode: 'bend' | 'mts-note' = 'bend', tuning = adaptive): Rig {
  const spell = (key: number): SpelledPitch => parseSpelledPitch(names[key] ?? 'C4');
  return new Rig({ tuning, gather: 'same-time', reference: A440, layout: 'multi', bendRange: 2, channels: Array.from({ length: 16 }, (_, i) => i), mode, speller: scriptedSpeller((n) => spell(n.key)) }, spell);
}

/** The newest voice the synth holds on a key (with gathering the rig cannot tag voices by the key that started them). */
const held = (r: Rig, key: number): ModelVoice => {
  const v = r.model.sounding().filter((x) => x.key === key && x.state === 'held').pop();
  if (!v) throw new Error(`nothing held on key ${key}`);
  return v;
};
const interval = (r: Rig, low: ModelVoice, high: ModelVoice): number => 1200 * Math.log2(r.model.frequency(high) / r.model.frequency(low));
const NAMES = { 48: 'C3', 50: 'D3', 52: 'E3', 53: 'F3', 55: 'G3', 57: 'A3', 59: 'B3', 60: 'C4', 62: 'D4', 64: 'E4', 65: 'F4', 67: 'G4', 69: 'A4', 71: 'B4', 72: 'C5' };

describe('just-adaptive through the engine, measured from the synth it drives', () => {
  for (const mode of ['bend', 'mts-note'] as const) {
    it(`${mode}: a triad struck together is pure: 5/4, 6/5 and 3/2`, () => {
      const r = rig(NAMES, mode);
      r.on(48).on(64).on(67).after(5).on(72); // C3 E4 G4 together (a chord is gathered as in a file), then C5
      const [c, e, g] = [held(r, 48), held(r, 64), held(r, 67)];
      expect(Math.abs(interval(r, c, e) - 1200 - cents(5 / 4))).toBeLessThan(BEND);
      expect(Math.abs(interval(r, c, g) - 1200 - cents(3 / 2))).toBeLessThan(BEND);
      expect(Math.abs(interval(r, e, g) - cents(6 / 5))).toBeLessThan(BEND);
    });

    it(`${mode}, pure now: notes played one by one against held ones are pure`, () => {
      const r = rig(NAMES, mode, pureNow);
      r.on(48).after(30).on(64).after(30).on(67).after(1).on(30); // C3, then E4, then G4 (a low note sounds the last)
      const [c, e, g] = [held(r, 48), held(r, 64), held(r, 67)];
      expect(Math.abs(interval(r, c, e) - 1200 - cents(5 / 4))).toBeLessThan(BEND);
      expect(Math.abs(interval(r, c, g) - 1200 - cents(3 / 2))).toBeLessThan(BEND);
      expect(Math.abs(interval(r, e, g) - cents(6 / 5))).toBeLessThan(BEND);
    });
  }

  it('the supertonic triad D–F–A is pure, where the fixed just table has a 680-cent fifth', () => {
    const r = rig(NAMES);
    r.on(48).on(52).on(55).after(200).off(48).off(52).off(55).after(20); // C major first
    r.on(50).on(53).on(57).after(5).on(62);
    const [d, f, a] = [held(r, 50), held(r, 53), held(r, 57)];
    expect(Math.abs(interval(r, d, a) - cents(3 / 2))).toBeLessThan(BEND);
    expect(Math.abs(interval(r, d, f) - cents(6 / 5))).toBeLessThan(BEND);
    expect(Math.abs(interval(r, f, a) - cents(5 / 4))).toBeLessThan(BEND);
    expect(r.tally.compromises).toBe(0);
  });

  it('a held note never moves, whatever is played against it', () => {
    const r = rig(NAMES);
    r.on(60).after(1).on(30);
    const c = held(r, 60);
    const before = r.model.frequency(c);
    for (const k of [64, 67, 62, 65, 69, 71, 57, 53]) {
      r.after(50).on(k).after(50).off(k);
      expect(r.model.frequency(c)).toBe(before);
    }
  });

  it('the comma pump C–Am–Dm–G–C played four times does not drift more than 3 cents (default setting)', () => {
    const r = rig(NAMES);
    const chords = [
      [48, 64, 67], // C
      [45 + 12, 60, 64], // A minor
      [50, 65, 69], // D minor
      [55, 62, 71], // G
    ];
    let first: number | undefined;
    let last = 0;
    for (let round = 0; round < 4; round++) {
      for (const chord of [...chords, [48, 64, 67]]) {
        for (const k of chord) r.on(k);
        r.after(1).on(30).after(399); // a low note after the chord sounds it (the chord is gathered at its onset)
        if (chord[0] === 48) {
          last = r.model.frequency(held(r, 48));
          first ??= last;
        }
        for (const k of chord) r.off(k);
        r.after(350); // detached, as a phrase of chords on a keyboard
      }
    }
    expect(Math.abs(cents(last / first!))).toBeLessThan(3);
  });

  it('spell reports each note’s distance from the fixed table and counts compromises', () => {
    const r = rig(NAMES);
    r.on(48).on(52).on(55).after(300).off(48).off(52).off(55).after(20).on(50).on(53).on(57).after(5).on(62);
    const notes = r.events.flatMap((e) => (e.type === 'note' ? [e] : []));
    expect(notes.every((n) => n.adaptive !== undefined)).toBe(true);
    // The D of the supertonic triad sits a syntonic comma (81/80) from the table's D (9/8 above C), or on it.
    const d = notes.find((n) => n.pitch.fifths === 2)!;
    expect(Math.min(Math.abs(d.adaptive!.fromTable), Math.abs(Math.abs(d.adaptive!.fromTable) - cents(81 / 80)))).toBeLessThan(0.5);
  });
});
