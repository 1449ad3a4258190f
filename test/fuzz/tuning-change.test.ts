import { describe, expect, it } from 'vitest';
import { loadTuningPreset } from '../../src/presets/tuning-presets.js';
import type { PieceChange, PieceOutputChange, PieceSource } from '../../src/router/pieces.js';
import { PitchTable } from '../../src/router/pitch-table.js';
import { createOutput, resolveEngineOptions, type EngineOptionsInput } from '../../src/router/setup.js';
import type { TuningChange } from '../../src/router/tuning-in-force.js';
import { ControlledSpeller } from '../../src/spelling/controlled.js';
import { parseKey } from '../../src/spelling/keys.js';
import { createStrategy } from '../../src/spelling/strategy.js';
import { parseReference } from '../../src/tuning/index.js';
import { describeSetup, FUZZ_SETUPS, generatePerformance, runEngineFuzz, type FuzzFlags } from '../support/fuzz.js';
import { Prng } from '../support/prng.js';

// The fuzz of test/fuzz/engine.test.ts with the tuning changed under the performance: set-tuning
// controls and a three-piece programme stepped back and forth at random moments, with notes held
// and pedals down; the second piece has output settings of its own (fewer channels, another bend
// range, a longer release guard), which take over only when nothing sounds. The invariants (test/support/invariants.ts, against the reference synth) include
// "no sounding note's pitch moves" (in mts-octave: unless a new note of its key class starts), so a
// held note retuned by a switch is a violation; nothing may be left stuck.
const FLAGS: FuzzFlags = { knownDefects: false, foundDefects: false };
const EVENTS = 2000;

function change(id: string, reference: string): TuningChange {
  const preset = loadTuningPreset(id);
  return { id, name: preset.name, tuning: preset.tuning, reference: parseReference(reference) };
}

/** The base output again, or one with other settings (fewer channels, a narrower bend range, a longer guard). */
function outputOf(options: EngineOptionsInput, tuning: TuningChange, other: boolean): PieceOutputChange {
  const bend = options.mode === 'bend' || options.mode === undefined;
  const resolved = resolveEngineOptions({
    ...options,
    tuning: tuning.tuning,
    reference: tuning.reference ?? options.reference,
    ...(other && { releaseGuardMs: 600, ...(bend && { channels: (options.channels ?? [1, 2, 3, 4, 5, 6]).slice(0, 3), bendRange: options.layout === 'multi' ? 2 : 24 }) }),
  });
  return { strategy: createOutput(resolved, new PitchTable(resolved.tuning, resolved.reference, resolved.synthA4)), releaseGuardMs: resolved.releaseGuardMs };
}

/** Three pieces, each with its tuning, a fresh speller of its own strategy, and (the second) its own output settings. */
function pieces(adaptive: boolean, options: EngineOptionsInput): PieceSource {
  const tunings = [change('meantone-1-4', 'A4=415'), change(adaptive ? 'just-adaptive' : 'pythagorean', 'A4=440'), change('werckmeister-3', 'C4=256')];
  const list: Array<() => PieceChange> = [
    () => ({ index: 0, count: 3, title: 'one', tuning: tunings[0]!, output: outputOf(options, tunings[0]!, false), spelling: { base: createStrategy({ strategy: 'key', key: parseKey('D minor') }), key: parseKey('D minor'), strategy: 'key' } }),
    () => ({ index: 1, count: 3, title: 'two', tuning: tunings[1]!, output: outputOf(options, tunings[1]!, true), spelling: { base: createStrategy({ strategy: 'fixed' }), key: undefined, strategy: 'fixed' } }),
    () => ({ index: 2, count: 3, title: 'three', tuning: tunings[2]!, output: outputOf(options, tunings[2]!, false), spelling: { base: createStrategy({ strategy: 'follow' }), key: undefined, strategy: 'follow' } }),
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

let totalSwaps = 0;

describe('fuzz: tunings and pieces changed under a random performance', () => {
  FUZZ_SETUPS.forEach((setup, i) => {
    it(`${describeSetup(setup)}: held notes keep their pitch across switches, nothing stuck, nothing malformed`, () => {
      const seed = 3000 + i;
      const adaptiveFits = setup.mode === 'bend' || setup.mode === 'mts-note';
      const steps = generatePerformance({ seed, events: EVENTS, setup, flags: FLAGS, sources: 2, hotplug: true });
      const rng = new Prng(seed ^ 0x7a11);
      const tunings = ['meantone-1-4', 'pythagorean', 'edo-31', 'just-major', ...(adaptiveFits ? ['just-adaptive'] : [])];
      let switches = 0;
      let swaps = 0; // outputs that took over (a performance that never falls silent for long has none)
      const report = runEngineFuzz(setup, seed, steps, 2, {
        engine: (options) => ({
          ...options,
          observer: (e) => {
            if (e.type === 'output' && !e.waiting) swaps++;
            options.observer?.(e);
          },
          releaseGuardMs: 400,
          speller: new ControlledSpeller(options.speller!), pieces: pieces(adaptiveFits, { ...options, releaseGuardMs: 400 }) }),
        between: (router, time, step) => {
          if (step % 50 !== 25) return [];
          switches++;
          const what = rng.int(0, 2);
          if (what === 0) return router.act(time, { action: { name: 'set-tuning', tuning: change(tunings[rng.int(0, tunings.length - 1)]!, rng.chance(0.5) ? 'A4=415' : 'A4=440') }, on: true });
          return router.act(time, { action: { name: what === 1 ? 'next-piece' : 'previous-piece' }, on: true });
        },
      });
      expect(switches).toBeGreaterThan(30);
      totalSwaps += swaps;
      expect(report.violations).toEqual([]);
      expect(report.clean).toBe(true);
    });
  });
  it('the outputs did change hands in these performances (so the swap itself was fuzzed)', () => {
    expect(totalSwaps).toBeGreaterThan(10);
  });
});
