import { describe, expect, it } from 'vitest';
import { loadTuningPreset } from '../../src/presets/tuning-presets.js';
import { setupSchema } from '../../src/presets/setup-schema.js';
import { createEngine, OUTPUT_MODE_IDS, resolveEngineOptions } from '../../src/router/setup.js';
import { ACTION_NAMES } from '../../src/spelling/control-map.js';
import { STRATEGIES } from '../../src/spelling/strategy.js';
import { resolveEngineCli } from '../../src/cli/engine-options.js';
import { A440 } from '../../src/tuning/index.js';
import { Rig } from '../support/rig.js';

const meantone = loadTuningPreset('meantone-1-4').tuning;
/** A keyboard's RPN 0 (MIDI 1.0: CC101/100 = 0/0 select pitch-bend sensitivity, CC6 semitones, CC38 cents), then the null RPN. */
const rpn0 = (rig: Rig, semitones: number): Rig => rig.cc(101, 0).cc(100, 0).cc(6, semitones).cc(38, 0).cc(101, 127).cc(100, 127);
/** A 14-bit bend of +100 cents at a wheel range of ±12 semitones: 8192 + 8192/12 (MIDI 1.0 bend scaling). */
const PLUS_100_AT_12 = 8192 + Math.round(8192 / 12);

describe('the keyboard’s own wheel range reaches every output', () => {
  const layouts = [
    ['bend, MPE', {}],
    ['bend, multi', { layout: 'multi' as const, bendRange: 24 }],
    ['mts-note', { mode: 'mts-note' as const }],
    ['mts-octave', { mode: 'mts-octave' as const }],
    ['pass', { mode: 'pass' as const, tuning: loadTuningPreset('edo-12').tuning }],
  ] as const;
  for (const [label, options] of layouts) {
    it(`${label}: RPN 0 = 12 semitones, then a bend of +100 cents sounds +100 cents`, () => {
      const rig = new Rig({ tuning: meantone, reference: A440, ...options });
      rpn0(rig, 12).on(60).on(64);
      rig.send([0xe0, PLUS_100_AT_12 & 0x7f, PLUS_100_AT_12 >> 7]);
      rig.wheelCents = ((PLUS_100_AT_12 - 8192) / 8192) * 1200; // what the player asked for: ±12 semitones
      // Half a bend step at the widest range used: ±48 (MPE members) gives 0.293 cent (MIDI 1.0 bend scaling).
      expect(rig.worstError()).toBeLessThan(0.3);
      expect(rig.model.sounding()).toHaveLength(2);
    });
  }

  it('a synth whose range is set by hand gets the bend rescaled to it instead', () => {
    const rig = new Rig({ tuning: meantone, reference: A440, mode: 'mts-note', sendBendRange: false, wheelRange: 2 });
    rig.model.channels[0]!.bendRange = 2; // the synth as set by hand: ±2
    rpn0(rig, 12).on(60);
    rig.send([0xe0, PLUS_100_AT_12 & 0x7f, PLUS_100_AT_12 >> 7]);
    rig.wheelCents = 100;
    expect(rig.worstError()).toBeLessThan(0.2);
  });
});

describe('output channels: one list of modes, given or not given', () => {
  it('one-channel modes default to channel 1, the bend output to 2–16', () => {
    expect(resolveEngineOptions({ tuning: meantone, reference: A440, mode: 'mts-note' }).channels).toEqual([0]);
    expect(resolveEngineOptions({ tuning: meantone, reference: A440, mode: 'pass' }).channels).toEqual([0]);
    expect(resolveEngineOptions({ tuning: meantone, reference: A440 }).channels).toEqual(Array.from({ length: 15 }, (_, i) => i + 1));
    expect(resolveEngineCli({ mode: 'mts-octave' }).options.channels).toBeUndefined(); // not given: the mode's default
  });

  it('refuses a list of channels for a one-channel mode, 2-16 included', () => {
    for (const list of ['2-16', '2-15', '1,2']) expect(() => resolveEngineCli({ mode: 'mts-note', channels: list }), list).toThrow(/sends on one channel/u);
    expect(resolveEngineCli({ mode: 'mts-note', channels: '5' }).options.channels).toEqual([4]);
  });

  it('the setup schema accepts every mode, strategy and action the command line does', () => {
    for (const mode of OUTPUT_MODE_IDS) expect(setupSchema.safeParse({ output: { mode } }).success, mode).toBe(true);
    expect(OUTPUT_MODE_IDS).toContain('samples');
    for (const strategy of STRATEGIES) expect(setupSchema.safeParse({ spelling: { strategy } }).success, strategy).toBe(true);
    for (const action of ACTION_NAMES) expect(setupSchema.safeParse({ controls: [{ cc: 80, action, key: 'D minor' }] }).success, action).toBe(true);
  });
});

describe('bend output bytes: a channel’s bend is sent when it is first used', () => {
  it('starts with no member bends, sends one per channel used, and centres only those at panic', () => {
    const rig = new Rig({ tuning: meantone, reference: A440 });
    const bends = (from: number, to = rig.sent.length) => rig.sent.slice(from, to).filter((m) => (m.data[0]! & 0xf0) === 0xe0).map((m) => m.data[0]! & 0x0f);
    expect(bends(0)).toEqual([0]); // the MPE master (the wheel) only
    const played = rig.sent.length;
    rig.on(60).on(64).on(67).off(60).off(64).off(67); // C, E, G: three bends in quarter-comma meantone
    expect(new Set(bends(played)).size).toBe(3);
    expect(rig.worstError()).toBeLessThan(0.3);
    const before = rig.sent.length;
    rig.panic();
    expect(bends(before).sort((a, b) => a - b)).toEqual([0, ...new Set(bends(played, before))].sort((a, b) => a - b));
  });

  it('a channel first used by an equal-tempered spelling still gets its bend (its state was unknown)', () => {
    const edo12 = loadTuningPreset('edo-12').tuning;
    const rig = new Rig({ tuning: edo12, reference: A440 });
    rig.model.channels[1]!.bend = 12000; // left bent by something before diesis started
    rig.on(60);
    expect(rig.worstError()).toBeLessThan(0.3);
  });
});

describe('a file is closed on the channels it used', () => {
  it('the closing panic ends what sounds on the channels used and leaves the others alone; live panic covers every channel', () => {
    const { router } = createEngine({ tuning: meantone, reference: A440 });
    router.start(0);
    router.process(0, [0x90, 60, 90]);
    router.process(0, [0x90, 64, 90]);
    router.process(10, [0xb0, 64, 127]); // a pedal: a zone-wide message to the MPE master (channel 1)
    const closing = router.close(500).map((m) => m.data);
    const channelsOf = (messages: ReadonlyArray<readonly number[]>, controller: number) =>
      new Set(messages.filter((d) => (d[0]! & 0xf0) === 0xb0 && d[1] === controller).map((d) => d[0]! & 0x0f));
    // C and E take one member channel each in quarter-comma meantone, plus the master (MPE, RP-053).
    expect(channelsOf(closing, 123).size).toBe(3);
    expect(channelsOf(closing, 123).has(0)).toBe(true);
    expect(channelsOf(router.panic(600).map((m) => m.data), 123).size).toBe(16);
  });
});
