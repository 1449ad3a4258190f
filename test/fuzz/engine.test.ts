import { describe, expect, it } from 'vitest';
import { describeSetup, FUZZ_SETUPS, generatePerformance, runEngineFuzz, runRenderFuzz, type FuzzFlags } from '../support/fuzz.js';

// Seeded fuzzing through the engine and through `render`, every output mode and layout with fixed
// and follow spelling; the promises checked are in test/support/invariants.ts (against the
// reference synth, written from the MIDI 1.0, MPE and MTS documents).
const FLAGS: FuzzFlags = { knownDefects: false, foundDefects: false };
const EVENTS = 3000;

describe('fuzz: random performances straight into the engine (two devices, unplugging)', () => {
  FUZZ_SETUPS.forEach((setup, i) => {
    it(`${describeSetup(setup)}: nothing stuck, nothing malformed, no retune under a note, one note-on out per note-on in`, () => {
      const seed = 1000 + i;
      const steps = generatePerformance({ seed, events: EVENTS, setup, flags: FLAGS, sources: 2, hotplug: true });
      const report = runEngineFuzz(setup, seed, steps, 2);
      expect(report.violations).toEqual([]);
      expect(report.counts.inputNoteOns).toBeGreaterThan(EVENTS / 10); // the performance is not mostly garbage
      expect(report.clean).toBe(true);
    });
  });
});

describe('fuzz: random performances as files through render', () => {
  FUZZ_SETUPS.forEach((setup, i) => {
    it(`${describeSetup(setup)}: nothing stuck, nothing malformed, no retune under a note, one note-on out per note-on in`, () => {
      const seed = 2000 + i;
      const steps = generatePerformance({ seed, events: EVENTS, setup, flags: FLAGS, sources: 1, hotplug: false });
      const report = runRenderFuzz(setup, seed, steps);
      expect(report.violations).toEqual([]);
      expect(report.counts.inputNoteOns).toBeGreaterThan(EVENTS / 10);
      expect(report.clean).toBe(true);
    });
  });
});
