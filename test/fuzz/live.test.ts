import { afterAll, describe, expect, it } from 'vitest';
import { disableMidi } from '../../src/io/midi-system.js';
import { describeSetup, FUZZ_SETUPS, generatePerformance, type FuzzFlags } from '../support/fuzz.js';
import { runLiveFuzz } from '../support/fuzz-live.js';

// Seeded fuzzing through the live bridge on virtual ports, with a keyboard and a pedal box
// unplugged and plugged back at random; the promises checked are in test/support/invariants.ts.
const FLAGS: FuzzFlags = { knownDefects: false, foundDefects: false };
const EVENTS = 1500;

afterAll(async () => {
  await disableMidi();
});

describe('fuzz: random performances through the live bridge on virtual ports, with unplugging', () => {
  FUZZ_SETUPS.filter((s) => !s.tuning).forEach((setup, i) => { // the adaptive tuner is the engine's; the engine and render runs cover it
    it(`${describeSetup(setup)}: nothing stuck, nothing malformed, no retune under a note, no note-on lost below the engine`, async () => {
      const seed = 3000 + i;
      const steps = generatePerformance({ seed, events: EVENTS, setup, flags: FLAGS, sources: 2, hotplug: true });
      expect(steps.filter((s) => 'hotplug' in s && s.hotplug === 'unplug').length).toBeGreaterThan(0);
      const report = await runLiveFuzz(setup, seed, steps);
      expect(report.violations).toEqual([]);
      expect(report.counts.inputNoteOns).toBeGreaterThan(EVENTS / 10);
      expect(report.inputDrops).toBeGreaterThan(0); // garbage arrived, and was dropped below the engine
      expect(report.clean).toBe(true);
    });
  });
});
