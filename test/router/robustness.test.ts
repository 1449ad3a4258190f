import { describe, expect, it } from 'vitest';
import { DEFAULT_WINDOW, parseSpelledPitch, spellKey, type SpelledPitch } from '../../src/pitch/index.js';
import { loadTuningPreset } from '../../src/presets/tuning-presets.js';
import { A440, frequency, parseReference } from '../../src/tuning/index.js';
import { Rig } from '../support/rig.js';
import { scriptedSpeller } from '../support/spellers.js';

const meantone = loadTuningPreset('meantone-1-4').tuning;
const multi = { tuning: meantone, reference: A440, layout: 'multi' as const, bendRange: 2 };
/** Half a bend step at ±2 semitones: 100·2/8192/2 = 0.0122 cent (MIDI 1.0 bend scaling). */
const AT_2 = 0.0123;

describe('a device that goes away takes its pedals with it', () => {
  it('a pedal box unplugged with its sustain down: the notes it held end at once, and stay ended when it returns', () => {
    const rig = new Rig(multi);
    rig.send([0xb0, 64, 127], undefined, 1); // the pedal box is source 1
    rig.on(60).on(64).off(60).off(64);
    expect(rig.model.active()).toHaveLength(2);
    rig.deliver(rig.router.releaseSource(rig.time, 1));
    expect(rig.model.active()).toHaveLength(0);
    expect(rig.router.soundingCount).toBe(0);
    expect(rig.router.sustainDown).toBe(false);
    // It comes back with its pedal up and sends nothing: new notes end on key up.
    rig.after(10).on(67).off(67);
    expect(rig.model.active()).toHaveLength(0);
  });

  it('a keyboard unplugged mid-chord with its own pedal down: the whole chord ends, keys and pedal', () => {
    const rig = new Rig(multi);
    rig.cc(64, 127).on(60).on(64).off(60).on(67); // E and G keyed, C held by the pedal
    expect(rig.model.active()).toHaveLength(3);
    rig.deliver(rig.router.releaseSource(rig.time, 0));
    expect(rig.model.active()).toHaveLength(0);
    expect(rig.router.soundingCount).toBe(0);
  });

  it('a keyboard unplugged while another device’s pedal holds its notes: they end all the same', () => {
    const rig = new Rig(multi);
    rig.send([0xb0, 64, 127], undefined, 1);
    rig.on(60).off(60).on(62);
    rig.deliver(rig.router.releaseSource(rig.time, 0));
    expect(rig.model.active()).toHaveLength(0); // the synth's pedal was lifted and put down again to end them
    expect(rig.router.sustainDown).toBe(true); // the pedal box is still there, its pedal still down
    rig.send([0x90, 64, 90], 64, 1); // a note from the other device still rings under its pedal
    rig.send([0x80, 64, 0], undefined, 1);
    expect(rig.model.active()).toHaveLength(1);
  });

  it('two devices’ sustain pedals: the synth keeps its pedal down while either is down', () => {
    const rig = new Rig(multi);
    rig.send([0xb0, 64, 127], undefined, 1);
    rig.cc(64, 127).on(60).off(60);
    rig.cc(64, 0); // the keyboard's pedal up, the pedal box's still down
    expect(rig.model.active()).toHaveLength(1);
    rig.send([0xb0, 64, 0], undefined, 1);
    expect(rig.model.active()).toHaveLength(0);
  });
});

describe('Reset All Controllers keeps every note in tune', () => {
  for (const [label, options] of [
    ['multi', multi],
    ['MPE', { tuning: meantone, reference: A440 }],
    ['mts-note', { tuning: meantone, reference: A440, mode: 'mts-note' as const }],
  ] as const) {
    it(`${label}: sounding notes keep their tuning; the wheel and pedals are reset`, () => {
      const rig = new Rig(options);
      rig.cc(64, 127).on(60).on(61).on(68).wheel(9000);
      rig.cc(121, 0);
      rig.wheelCents = 0;
      // The reset's effects reach the synth (RP-015), but no channel's tuning bend is lost.
      expect(rig.worstError()).toBeLessThan(0.3); // half a bend step at ±48 (MPE members)
      expect(rig.model.channels.some((c) => c.sustain)).toBe(false);
      expect(rig.sent.some((m) => m.data[1] === 121 && (m.data[0]! & 0xf0) === 0xb0)).toBe(false);
      rig.off(60).off(61).off(68);
      expect(rig.model.active()).toHaveLength(0); // the pedal is up: released notes end
    });
  }
});

describe('mts-note slots and pedals', () => {
  const spell = (names: Record<number, string>) => (key: number): SpelledPitch => parseSpelledPitch(names[key] ?? 'C4');

  it('never retunes a slot a pedal still holds: a G♯4 under the pedal stays G♯4 when no slot is free', () => {
    let flip = false;
    const spelling = (key: number): SpelledPitch => (key === 68 && flip ? parseSpelledPitch('Ab4') : spellKey(DEFAULT_WINDOW, key));
    const rig = new Rig({ tuning: meantone, reference: A440, mode: 'mts-note', releaseGuardMs: 60_000, speller: scriptedSpeller((n) => spelling(n.key)) }, spelling);
    for (let key = 0; key < 128; key++) if (key !== 68) rig.on(key).off(key); // every other slot used, ringing out within its guard
    rig.after(10).cc(64, 127).on(68).off(68); // G♯4 held by the pedal
    const gSharp = rig.voice(68);
    flip = true;
    rig.after(10).on(68); // A♭4 on the same key: its slot sounds, every other one is in its guard
    const aFlat = rig.voice(68);
    expect(aFlat).not.toBe(gSharp);
    expect(Math.abs(1200 * Math.log2(rig.model.frequency(aFlat) / frequency(meantone, A440, parseSpelledPitch('Ab4'))))).toBeLessThan(0.0031);
    expect(gSharp.state).toBe('sustained');
    // Quarter-comma G♯4 at A4 = 440 (the tuning core), to MTS resolution (100/16384 cent).
    expect(Math.abs(1200 * Math.log2(rig.model.frequency(gSharp) / frequency(meantone, A440, parseSpelledPitch('G#4'))))).toBeLessThan(0.0031);
  });

  it('counts a note below what MTS can say as out of range instead of clamping silently', () => {
    const low = spell({ 0: 'B#-2' });
    const rig = new Rig({ tuning: meantone, reference: parseReference('A4=415'), mode: 'mts-note', speller: scriptedSpeller((n) => low(n.key)) }, low);
    rig.on(0);
    expect(rig.tally.outOfRange).toBe(1);
    expect(rig.events.some((e) => e.type === 'out-of-range')).toBe(true);
  });
});

describe('sustain in the multi layout', () => {
  it('a key released under the pedal ends when the pedal lifts (one rule for every output)', () => {
    const rig = new Rig(multi);
    rig.cc(64, 127).on(60).off(60).cc(64, 0);
    expect(rig.model.active()).toHaveLength(0);
    expect(rig.worstError()).toBeLessThan(AT_2);
  });
});

describe('two devices’ sostenuto pedals: one latch, as the synth has', () => {
  it('a note latched by the first pedal rings until the last pedal lifts, in the book as in the synth', () => {
    const rig = new Rig(multi);
    const agree = (): void => expect(rig.router.soundingCount).toBe(rig.model.active().length);
    rig.on(60); // C held
    rig.send([0xb0, 66, 127], undefined, 1); // the pedal box's sostenuto latches C
    rig.cc(66, 127); // the keyboard's sostenuto too: the synth's is down already, nothing new is latched
    rig.off(60);
    agree();
    rig.on(64); // E, held while the keyboard's sostenuto goes down again: the synth's is already down, so E is not latched
    rig.cc(66, 0).cc(66, 127);
    rig.off(64);
    agree();
    rig.send([0xb0, 66, 0], undefined, 1); // the pedal box lifts; the keyboard's sostenuto still holds C
    expect(rig.model.active()).toHaveLength(1);
    agree();
    rig.cc(66, 0); // the last sostenuto lifts: C ends
    expect(rig.model.active()).toHaveLength(0);
    agree();
  });
});
