import { describe, expect, it } from 'vitest';
import { parseSpelledPitch, type SpelledPitch } from '../../src/pitch/index.js';
import { loadTuningPreset } from '../../src/presets/tuning-presets.js';
import { A440, parseReference } from '../../src/tuning/index.js';
import { Rig } from '../support/rig.js';
import { scriptedSpeller } from '../support/spellers.js';

const meantone = loadTuningPreset('meantone-1-4').tuning;
const multi = { tuning: meantone, reference: A440, layout: 'multi' as const, bendRange: 2 };
/** Step of the bend at ±2 is 0.0244 cent; the error is at most half of it. */
const AT_2 = 0.0123;

/** A speller fixed by the test: key → spelling, from a table of names. */
function spelled(names: Record<number, string>): (key: number) => SpelledPitch {
  return (key) => {
    const name = names[key];
    if (!name) throw new Error(`no spelling for ${key}`);
    return parseSpelledPitch(name);
  };
}

const speller = (spell: (key: number) => SpelledPitch) => scriptedSpeller((n) => spell(n.key));

describe('bend output: start-up', () => {
  it('configures an MPE lower zone: zone message, member ranges ±48, master ±2, bends centred (RP-053)', () => {
    const rig = new Rig({ tuning: meantone, reference: A440 });
    expect(rig.model.zone).toEqual({ master: 0, members: Array.from({ length: 15 }, (_, i) => i + 1) });
    expect(rig.model.channels[1]!.bendRange).toBe(48);
    expect(rig.model.channels[15]!.bendRange).toBe(48);
    expect(rig.model.channels[0]!.bendRange).toBe(2);
    expect(rig.model.channels.every((c) => c.bend === 8192)).toBe(true);
    // The zone message itself sets ±48 and ±2 (RP-053): no RPN 0 needs to follow it.
    expect(rig.sent.filter((m) => m.data[1] === 100 && m.data[2] === 0)).toEqual([]);
    // Other ranges follow the zone message, which would otherwise reset them.
    const wide = new Rig({ tuning: meantone, reference: A440, bendRange: 24, wheelRange: 12 });
    expect(wide.model.channels[1]!.bendRange).toBe(24);
    expect(wide.model.channels[0]!.bendRange).toBe(12);
    const first = wide.sent.findIndex((m) => m.data[1] === 100 && m.data[2] === 6);
    const firstRange = wide.sent.findIndex((m) => m.data[1] === 6 && m.data[2] === 24);
    expect(first).toBeGreaterThanOrEqual(0);
    expect(first).toBeLessThan(firstRange);
  });

  it('sets ±2 on every member channel of a multitimbral layout, or any range asked for', () => {
    const rig = new Rig({ ...multi, channels: [0, 1, 2, 3] });
    expect(rig.model.zone).toBeUndefined();
    expect(rig.model.channels.slice(0, 4).map((c) => c.bendRange)).toEqual([2, 2, 2, 2]);
    expect(new Rig({ ...multi, bendRange: 12, channels: [4] }).model.channels[4]!.bendRange).toBe(12);
  });

  it('refuses an MPE layout on channels that are not a zone', async () => {
    const { createRouter } = await import('../../src/router/setup.js');
    expect(() => createRouter({ tuning: meantone, reference: A440, channels: [2, 3, 5] })).toThrow(/MPE layout needs member channels/u);
  });
});

describe('bend output: tuning and channel sharing', () => {
  it('sounds quarter-comma spellings at their exact frequencies (±2, within the bend step)', () => {
    const rig = new Rig(multi);
    for (const key of [60, 61, 63, 64, 66, 68, 70]) rig.on(key);
    expect(rig.worstError()).toBeLessThan(AT_2);
    expect(rig.model.active()).toHaveLength(7);
  });

  it('sounds them within half a step at the MPE range ±48', () => {
    const rig = new Rig({ tuning: meantone, reference: A440 });
    for (const key of [48, 55, 60, 64, 67, 68, 72]) rig.on(key);
    expect(rig.worstError()).toBeLessThan(0.293);
  });

  it('puts every octave of one spelling on one channel, and other spellings on others', () => {
    const rig = new Rig(multi);
    rig.on(60).on(72).on(48).on(64).on(76);
    expect(rig.voice(72).channel).toBe(rig.voice(60).channel);
    expect(rig.voice(48).channel).toBe(rig.voice(60).channel);
    expect(rig.voice(76).channel).toBe(rig.voice(64).channel);
    expect(rig.voice(64).channel).not.toBe(rig.voice(60).channel);
  });

  it('plays G♯ and A♭ of the same key at once on two channels, 41 cents apart', () => {
    const rig = new Rig({ ...multi, speller: speller(spelled({ 68: 'G#4', 80: 'Ab5' })) }, spelled({ 68: 'G#4', 80: 'Ab5' }));
    rig.on(68).on(80);
    expect(rig.voice(68).channel).not.toBe(rig.voice(80).channel);
    const gap = 1200 * Math.log2(rig.model.frequency(rig.voice(80)) / 2 / rig.model.frequency(rig.voice(68)));
    expect(gap).toBeCloseTo(41.059, 1); // the lesser diesis (Barbour 1951; memory, as quoted in the design notes)
  });

  it('shares one channel for spellings with the same bend: all of 12-ET, both spellings of a well temperament', () => {
    const et = new Rig({ ...multi, tuning: loadTuningPreset('edo-12').tuning });
    et.on(60).on(61).on(62).on(66);
    expect(new Set(et.model.active().map((v) => v.channel)).size).toBe(1);
    const wm = loadTuningPreset('werckmeister-3').tuning;
    const both = spelled({ 68: 'G#4', 80: 'Ab5' });
    const rig = new Rig({ ...multi, tuning: wm, speller: speller(both) }, both);
    rig.on(68).on(80);
    expect(rig.voice(68).channel).toBe(rig.voice(80).channel);
  });

  it('moves a note to the nearest 12-ET key when the reference is a semitone away (A4 = 415)', () => {
    const rig = new Rig({ ...multi, reference: parseReference('A4=415') });
    rig.on(69);
    expect(rig.voice(69).key).toBe(68);
    expect(rig.model.frequency(rig.voice(69))).toBeCloseTo(415, 2);
    expect(rig.worstError()).toBeLessThan(AT_2);
  });

  it('calibrates to a synth tuned to its own A4, and counts bends the range cannot reach', () => {
    const rig = new Rig({ ...multi, synthA4: 442 });
    rig.on(69);
    expect(rig.model.frequency(rig.voice(69))).toBeCloseTo(440, 2);
    const narrow = new Rig({ ...multi, bendRange: 0.1 }); // ±10 cents cannot reach meantone's −24 on B♭
    narrow.on(70);
    expect(narrow.tally.outOfRange).toBe(1);
    expect(narrow.events.some((e) => e.type === 'out-of-range')).toBe(true);
  });
});

describe('bend output: the release guard and stealing', () => {
  const three = spelled({ 60: 'C4', 61: 'C#4', 62: 'D4', 63: 'D#4', 68: 'G#4' });

  it('never retunes a channel while its note rings within the guard; reuses it after', () => {
    const rig = new Rig({ ...multi, channels: [1, 2], releaseGuardMs: 400, speller: speller(three) }, three);
    rig.on(60).on(61);
    rig.off(60).after(100).off(61);
    rig.after(100).on(62); // C's channel is still in its guard: D must wait for… none is free: steal
    expect(rig.tally.steals).toBe(1);
    expect(rig.worstError()).toBeLessThan(AT_2);
    const rig2 = new Rig({ ...multi, channels: [1, 2], releaseGuardMs: 400, speller: speller(three) }, three);
    rig2.on(60).off(60).after(401).on(62);
    expect(rig2.voice(62).channel).toBe(2); // least recently used: channel 3 (index 2) never used
    rig2.off(62).after(401).on(63);
    expect(rig2.voice(63).channel).toBe(1); // channel 2 (index 1) was used longest ago
    expect(rig2.tally.steals).toBe(0);
  });

  it('steals the channel whose newest note started longest ago, ending its notes cleanly', () => {
    const rig = new Rig({ ...multi, channels: [1, 2], speller: speller(three) }, three);
    rig.on(60).after(10).on(61).after(10).on(62);
    expect(rig.tally.steals).toBe(1);
    expect(rig.events.filter((e) => e.type === 'steal')).toHaveLength(1);
    // C (the oldest) was ended: the model no longer has it; C♯ and D sound, in tune.
    expect(rig.model.sounding().map((v) => v.key).sort()).toEqual([61, 62]);
    expect(rig.worstError()).toBeLessThan(AT_2);
    // Releasing the stolen key later sends nothing that could end another note.
    const before = rig.model.active().length;
    rig.off(60);
    expect(rig.model.active()).toHaveLength(before);
    rig.off(61).off(62);
    expect(rig.model.active()).toHaveLength(0);
  });
});

describe('bend output: pedals', () => {
  const two = spelled({ 60: 'C4', 61: 'C#4', 62: 'D4', 63: 'Eb4', 64: 'E4', 68: 'G#4', 56: 'Ab3' });

  it('keeps a key released under the sustain pedal on its channel and tuning until the pedal lifts', () => {
    const rig = new Rig({ ...multi, channels: [1, 2], speller: speller(two) }, two);
    rig.cc(64, 127).on(60).off(60);
    expect(rig.model.active()).toHaveLength(1);
    rig.after(1000).on(61); // long past the guard, but C still sounds under the pedal
    expect(rig.voice(61).channel).not.toBe(rig.voice(60).channel);
    expect(rig.worstError()).toBeLessThan(AT_2);
    rig.after(10).on(62); // a third spelling: only by stealing, and C (oldest) is the one
    expect(rig.tally.steals).toBe(1);
    expect(rig.model.active().map((v) => v.key).sort()).toEqual([61, 62]);
    rig.cc(64, 0).off(61).off(62);
    expect(rig.model.active()).toHaveLength(0);
    expect(rig.router.soundingCount).toBe(0);
  });

  it('reuses the channel when a sustained key is struck again with the same spelling', () => {
    const rig = new Rig({ ...multi, speller: speller(two) }, two);
    rig.cc(64, 127).on(60).off(60);
    const channel = rig.voice(60).channel;
    rig.after(50).on(60);
    expect(rig.voice(60).channel).toBe(channel);
    rig.off(60).cc(64, 0);
    expect(rig.model.active()).toHaveLength(0);
  });

  it('holds only the notes that were down when sostenuto went down', () => {
    const rig = new Rig({ ...multi, speller: speller(two) }, two);
    rig.on(60).cc(66, 127).on(64).off(60).off(64);
    expect(rig.model.active().map((v) => v.key)).toEqual([60]);
    expect(rig.router.soundingCount).toBe(1);
    rig.cc(66, 0);
    expect(rig.model.active()).toHaveLength(0);
    expect(rig.router.soundingCount).toBe(0);
  });

  it('sends sustain, sostenuto and soft to the MPE master, or to every member channel', () => {
    const mpe = new Rig({ tuning: meantone, reference: A440 });
    mpe.cc(64, 127).cc(67, 100);
    const ccs = (rig: Rig) => rig.sent.filter((m) => (m.data[0]! & 0xf0) === 0xb0 && (m.data[1] === 64 || m.data[1] === 67)).map((m) => m.data[0]! & 15);
    expect(ccs(mpe)).toEqual([0, 0]);
    const multiRig = new Rig({ ...multi, channels: [1, 2, 3] });
    multiRig.cc(64, 127);
    expect(ccs(multiRig)).toEqual([1, 2, 3]);
  });
});

describe('bend output: the wheel and the player’s other controls', () => {
  it('adds the wheel to every sounding channel’s tuning bend (multitimbral)', () => {
    const rig = new Rig(multi);
    rig.on(60).on(64).on(68);
    rig.wheel(12288); // +1 semitone at the default wheel range ±2
    expect(rig.worstError()).toBeLessThan(AT_2);
    rig.wheel(8192);
    rig.on(70);
    expect(rig.worstError()).toBeLessThan(AT_2);
    rig.wheel(1000).on(62); // −175.6 cents: with the tunings' −17 still inside ±2 semitones
    expect(rig.worstError()).toBeLessThan(AT_2 * 2);
  });

  it('sends the wheel as the MPE master channel’s bend', () => {
    const rig = new Rig({ tuning: meantone, reference: A440 });
    rig.on(60).on(68).wheel(4096);
    expect(rig.model.channels[0]!.bend).toBe(4096);
    expect(rig.worstError()).toBeLessThan(0.293);
  });

  it('takes the wheel range from the keyboard’s own RPN 0 and never forwards registered parameters', () => {
    const rig = new Rig(multi);
    rig.cc(101, 0).cc(100, 0).cc(6, 12).cc(38, 0).cc(101, 127).cc(100, 127);
    expect(rig.sent.filter((m) => m.time > 0 && (m.data[1] === 101 || m.data[1] === 6))).toEqual([]);
    rig.on(60);
    rig.send([0xe0, 8875 & 0x7f, 8875 >> 7]); // 683/8192 of ±12 semitones: about +100 cents
    rig.wheelCents = (683 / 8192) * 1200;
    expect(rig.worstError()).toBeLessThan(AT_2);
  });

  it('forwards non-registered parameters, programs, banks and pressure to the zone, poly pressure to the note', () => {
    const rig = new Rig({ ...multi, channels: [1, 2] });
    rig.cc(99, 1).cc(98, 2).cc(6, 3).cc(0, 5).cc(32, 1).send([0xc0, 7]);
    rig.send([0xd0, 90]);
    rig.on(60);
    rig.send([0xa0, 60, 33]);
    const after = rig.sent.filter((m) => m.time === 0 && m.data[0]! !== 0xe1 && m.data[0]! !== 0xe2).map((m) => m.data);
    expect(after).toEqual(expect.arrayContaining([[0xb1, 99, 1], [0xb2, 99, 1], [0xb1, 6, 3], [0xb2, 6, 3], [0xb1, 0, 5], [0xc1, 7], [0xc2, 7], [0xd1, 90], [0xd2, 90]]));
    const v = rig.voice(60);
    expect(after).toContainEqual([0xa0 | v.channel, v.key, 33]);
  });

  it('passes system exclusive and real-time through, and consumes active sensing', () => {
    const rig = new Rig(multi);
    const before = rig.sent.length;
    rig.send([0xf8]).length;
    rig.send([0xf0, 0x7e, 0x7f, 0x06, 0x01, 0xf7]);
    rig.send([0xfe]);
    expect(rig.sent.slice(before).map((m) => m.data)).toEqual([[0xf8], [0xf0, 0x7e, 0x7f, 0x06, 0x01, 0xf7]]);
  });

  it('releases every note 300 ms after active sensing stops (MIDI 1.0)', () => {
    const rig = new Rig(multi);
    rig.send([0xfe]).length;
    rig.cc(64, 127).on(60).on(64).off(64);
    rig.deliver(rig.router.tick(250));
    expect(rig.model.active()).toHaveLength(2);
    rig.deliver(rig.router.tick(301));
    expect(rig.model.active()).toHaveLength(0);
    expect(rig.router.soundingCount).toBe(0);
  });

  it('handles All Notes Off, All Sound Off and Reset All Controllers from the keyboard', () => {
    const rig = new Rig(multi);
    rig.on(60).on(64).cc(123, 0);
    expect(rig.model.active()).toHaveLength(0);
    rig.cc(64, 127).on(62).off(62).cc(121, 0);
    expect(rig.model.active()).toHaveLength(0); // the reset lifts the pedal
    rig.on(63).on(68);
    expect(rig.worstError()).toBeLessThan(AT_2); // bends sent again after the reset
    rig.cc(120, 0);
    expect(rig.model.sounding()).toHaveLength(0);
    rig.on(61).cc(126, 1); // mono mode: All Notes Off, not forwarded
    expect(rig.model.active()).toHaveLength(0);
    expect(rig.sent.some((m) => m.data[1] === 126)).toBe(false);
  });

  it('re-strikes cleanly when two inputs play the same key with the same spelling', () => {
    const rig = new Rig(multi);
    rig.send([0x90, 60, 100], 60);
    rig.send([0x91, 60, 90], 60);
    expect(rig.model.doubleNoteOns).toBe(0);
    rig.send([0x80, 60, 0]);
    expect(rig.model.active()).toHaveLength(1);
    rig.send([0x81, 60, 0]);
    expect(rig.model.active()).toHaveLength(0);
  });
});

describe('panic', () => {
  it('ends every note, lifts pedals, sends All Notes Off and centres bends on every channel used', () => {
    const rig = new Rig(multi);
    rig.cc(64, 127).cc(66, 127).on(60).on(61).off(61).on(68).wheel(3000);
    const before = rig.sent.length;
    rig.panic();
    const sent = rig.sent.slice(before).map((m) => m.data);
    expect(rig.model.active()).toHaveLength(0);
    for (let c = 1; c < 16; c++) {
      expect(sent).toContainEqual([0xb0 | c, 64, 0]);
      expect(sent).toContainEqual([0xb0 | c, 66, 0]);
      expect(sent).toContainEqual([0xb0 | c, 123, 0]);
    }
    const used = rig.tally.channelsUsed();
    expect(used).toHaveLength(3); // C, C♯ and G♯ each need a bend of their own
    for (const c of used) expect(sent).toContainEqual([0xe0 | c, 0, 64]);
    // Every channel whose bend was ever sent is centred; none other is touched.
    const bent = new Set(rig.sent.slice(0, before).filter((m) => (m.data[0]! & 0xf0) === 0xe0).map((m) => m.data[0]! & 0x0f));
    expect(new Set(sent.filter((d) => (d[0]! & 0xf0) === 0xe0).map((d) => d[0]! & 0x0f))).toEqual(bent);
    expect(rig.router.soundingCount).toBe(0);
    // Notes still work after a panic (once the old release tails have died away).
    rig.wheelCents = 0;
    rig.after(500).on(64);
    expect(rig.worstError()).toBeLessThan(AT_2);
  });

  it('releases a vanished source’s notes at once', () => {
    const rig = new Rig(multi);
    rig.send([0x90, 60, 100], 60);
    rig.deliver(rig.router.process(0, [0x90, 64, 100], 1), 64);
    rig.deliver(rig.router.releaseSource(5, 1));
    expect(rig.model.active().map((v) => v.key)).toEqual([60]);
  });
});
