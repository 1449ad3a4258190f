import { describe, expect, it } from 'vitest';
import { loadTuningPreset } from '../../src/presets/tuning-presets.js';
import type { PieceChange, PieceSource } from '../../src/router/pieces.js';
import type { TuningChange } from '../../src/router/tuning-in-force.js';
import { ControlledSpeller } from '../../src/spelling/controlled.js';
import { parseKey } from '../../src/spelling/keys.js';
import { createStrategy } from '../../src/spelling/strategy.js';
import { parseReference } from '../../src/tuning/index.js';
import { describeSetup, FUZZ_SETUPS, generatePerformance, runEngineFuzz, type FuzzFlags } from '../support/fuzz.js';
import { Prng } from '../support/prng.js';

// The fuzz of test/fuzz/engine.test.ts with the tuning changed under the performance: set-tuning
// controls and a three-piece programme stepped back and forth at random moments, with notes held
// and pedals down. The invariants (test/support/invariants.ts, against the reference synth) include
// "no sounding note's pitch moves" (in mts-octave: unless a new note of its key class starts), so a
// held note retuned by a switch is a violation; nothing may be left stuck.
const FLAGS: FuzzFlags = { knownDefects: false, foundDefects: false };
const EVENTS = 2000;

function change(id: string, reference: string): TuningChange {
  const preset = loadTuningPreset(id);
  return { id, name: preset.name, tuning: preset.tuning, reference: parseReference(reference) };
}

/** Three pieces, each with its tuning and a fresh speller of its own strategy. */
function pieces(adaptive: boolean): PieceSource {
  const list: Array<() => PieceChange> = [
    () => ({ index: 0, count: 3, title: 'one', tuning: change('meantone-1-4', 'A4=415'), spelling: { base: createStrategy({ strategy: 'key', key: parseKey('D minor') }), key: parseKey('D minor'), strategy: 'key' } }),
    () => ({ index: 1, count: 3, title: 'two', tuning: change(adaptive ? 'just-adaptive' : 'pythagorean', 'A4=440'), spelling: { base: createStrategy({ strategy: 'fixed' }), key: undefined, strategy: 'fixed' } }),
    () => ({ index: 2, count: 3, title: 'three', tuning: change('werckmeister-3', 'C4=256'), spelling: { base: createStrategy({ strategy: 'follow' }), key: undefined, strategy: 'follow' } }),
  ];
  let at = 0;
  return {
    step(step) {
      return this.at(at + step);
    },
    at(index) {
      const make = list[index];
      if (!make) return undefined;
      at = index;
      return make();
    },
  };
}

describe('fuzz: tunings and pieces changed under a random performance', () => {
  FUZZ_SETUPS.forEach((setup, i) => {
    it(`${describeSetup(setup)}: held notes keep their pitch across switches, nothing stuck, nothing malformed`, () => {
      const seed = 3000 + i;
      const adaptiveFits = setup.mode === 'bend' || setup.mode === 'mts-note';
      const steps = generatePerformance({ seed, events: EVENTS, setup, flags: FLAGS, sources: 2, hotplug: true });
      const rng = new Prng(seed ^ 0x7a11);
      const tunings = ['meantone-1-4', 'pythagorean', 'edo-31', 'just-major', ...(adaptiveFits ? ['just-adaptive'] : [])];
      let switches = 0;
      const report = runEngineFuzz(setup, seed, steps, 2, {
        engine: (options) => ({ ...options, speller: new ControlledSpeller(options.speller!), pieces: pieces(adaptiveFits) }),
        between: (router, time, step) => {
          if (step % 50 !== 25) return [];
          switches++;
          const what = rng.int(0, 2);
          if (what === 0) return router.act(time, { action: { name: 'set-tuning', tuning: change(tunings[rng.int(0, tunings.length - 1)]!, rng.chance(0.5) ? 'A4=415' : 'A4=440') }, on: true });
          return router.act(time, { action: { name: what === 1 ? 'next-piece' : 'previous-piece' }, on: true });
        },
      });
      expect(switches).toBeGreaterThan(30);
      expect(report.violations).toEqual([]);
      expect(report.clean).toBe(true);
    });
  });
});
