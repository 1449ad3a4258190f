import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { candidateSpellings, DEFAULT_WINDOW, spellKey, type SpelledPitch } from '../../src/pitch/index.js';
import { loadTuningPreset } from '../../src/presets/tuning-presets.js';
import { createRouter, type EngineOptionsInput } from '../../src/router/setup.js';
import { parseReference } from '../../src/tuning/index.js';
import { Rig } from '../support/rig.js';
import { scriptedSpeller } from '../support/spellers.js';
import { malformation } from '../../src/synth/reference-synth.js';

type Command =
  | { t: 'on'; key: number; velocity: number; spelling: number }
  | { t: 'off'; key: number }
  | { t: 'chord'; keys: number[] }
  | { t: 'release-all' }
  | { t: 'sustain'; down: boolean }
  | { t: 'sostenuto'; down: boolean }
  | { t: 'wheel'; value: number }
  | { t: 'wait'; ms: number };

const key = fc.integer({ min: 21, max: 108 });
const command: fc.Arbitrary<Command> = fc.oneof(
  { weight: 5, arbitrary: fc.record({ t: fc.constant('on' as const), key, velocity: fc.integer({ min: 1, max: 127 }), spelling: fc.nat(2) }) },
  { weight: 4, arbitrary: fc.record({ t: fc.constant('off' as const), key }) },
  { weight: 1, arbitrary: fc.record({ t: fc.constant('chord' as const), keys: fc.uniqueArray(key, { minLength: 40, maxLength: 40 }) }) },
  { weight: 1, arbitrary: fc.constant({ t: 'release-all' as const }) },
  { weight: 2, arbitrary: fc.record({ t: fc.constant('sustain' as const), down: fc.boolean() }) },
  { weight: 1, arbitrary: fc.record({ t: fc.constant('sostenuto' as const), down: fc.boolean() }) },
  // Within ±1 semitone of wheel, so tuning plus wheel stays inside a ±2 bend range.
  { weight: 2, arbitrary: fc.record({ t: fc.constant('wheel' as const), value: fc.integer({ min: 4096, max: 12288 }) }) },
  { weight: 3, arbitrary: fc.record({ t: fc.constant('wait' as const), ms: fc.integer({ min: 0, max: 700 }) }) },
);

const tunings = ['meantone-1-4', 'meantone-1-3', 'pythagorean', 'werckmeister-3', 'just-major', 'edo-31'].map((id) => loadTuningPreset(id).tuning);
const references = ['A4=440', 'A4=415', 'A4=466', 'C4=256'].map((r) => parseReference(r));

/**
 * Plays a random performance and checks, after every step, every sounding voice's frequency.
 * Each note-on picks one of its key's spellings (up to two sharps or flats), so spellings come and
 * go and channels and slots are reassigned, guarded and stolen as on stage.
 */
function perform(options: EngineOptionsInput, tolerance: number, commands: Command[]): void {
  const chosen = new Map<number, SpelledPitch>();
  const spell = (k: number): SpelledPitch => chosen.get(k) ?? spellKey(DEFAULT_WINDOW, k);
  const speller = scriptedSpeller((n) => spell(n.key));
  const rig = new Rig({ ...options, speller }, spell);
  const held = new Set<number>();
  const step = (): void => {
    expect(rig.worstError()).toBeLessThanOrEqual(tolerance);
    expect(rig.model.doubleNoteOns).toBe(0);
    // The router's book of sounding notes matches what the synth holds or sustains.
    expect(rig.router.soundingCount).toBe(rig.model.active().length);
  };
  for (const c of commands) {
    switch (c.t) {
      case 'on': {
        const candidates = candidateSpellings(c.key, 2);
        chosen.set(c.key, candidates[c.spelling % candidates.length]!);
        rig.on(c.key, c.velocity);
        held.add(c.key);
        break;
      }
      case 'off':
        rig.off(c.key);
        held.delete(c.key);
        break;
      case 'chord':
        for (const k of c.keys) {
          chosen.delete(k);
          rig.on(k, 80);
          held.add(k);
        }
        break;
      case 'release-all':
        for (const k of held) rig.off(k);
        held.clear();
        break;
      case 'sustain':
        rig.cc(64, c.down ? 127 : 0);
        break;
      case 'sostenuto':
        rig.cc(66, c.down ? 127 : 0);
        break;
      case 'wheel':
        rig.wheel(c.value);
        break;
      case 'wait':
        rig.after(c.ms);
        break;
    }
    step();
  }
  for (const k of held) rig.off(k);
  rig.cc(64, 0).cc(66, 0);
  step();
  // After every key and pedal is up, nothing is held or sustained, in the synth or in the router.
  expect(rig.model.active()).toEqual([]);
  expect(rig.router.soundingCount).toBe(0);
}

const setup = fc.record({ tuning: fc.constantFrom(...tunings), reference: fc.constantFrom(...references) });
const performance = fc.array(command, { maxLength: 80 });

describe('random performances against the reference synth model (properties)', () => {
  // Few channels, so that channels are reassigned, guarded and stolen often.
  it('bend, multitimbral ±2 on 4 channels: every note within 0.0123 cent (half a bend step)', () => {
    fc.assert(
      fc.property(setup, performance, (s, commands) => perform({ ...s, layout: 'multi', bendRange: 2, channels: [2, 3, 4, 5] }, 0.0123, commands)),
      { numRuns: 300 },
    );
  });

  it('bend, MPE zone ±48 (master 1, members 2–6): every note within 0.293 cent (half a bend step)', () => {
    fc.assert(fc.property(setup, performance, (s, commands) => perform({ ...s, channels: [1, 2, 3, 4, 5] }, 0.293, commands)), { numRuns: 100 });
  });

  it('mts-note: every note within 0.0031 cent (half an MTS step)', () => {
    fc.assert(
      fc.property(setup, performance, (s, commands) => perform({ ...s, mode: 'mts-note', channels: [0] }, 0.0031, commands)),
      { numRuns: 80 },
    );
  });
});

describe('garbage input', () => {
  it('random bytes, truncated messages and stray data never throw and never produce malformed MIDI', () => {
    const bytes = fc.array(fc.oneof(fc.integer({ min: 0, max: 255 }), fc.constantFrom(0x90, 0x80, 0xb0, 0xf0, 0xf7, 0xe0, 64, 127, 0)), { maxLength: 400 });
    fc.assert(
      fc.property(fc.constantFrom('bend', 'mts-note', 'mts-octave', 'pass' as const), fc.array(bytes, { maxLength: 8 }), (mode, chunks) => {
        const router = createRouter({ tuning: tunings[0]!, reference: references[0]!, mode, channels: mode === 'bend' ? undefined : [0] });
        const out = [...router.start(0)];
        chunks.forEach((chunk, i) => out.push(...router.process(i * 10, chunk, i % 2)));
        out.push(...router.tick(10_000), ...router.panic(10_001));
        for (const m of out) expect(malformation(m.data), JSON.stringify(m.data)).toBeUndefined();
        expect(router.soundingCount).toBe(0);
      }),
      { numRuns: 300 },
    );
  });
});
