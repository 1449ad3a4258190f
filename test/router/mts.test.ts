import { describe, expect, it } from 'vitest';
import { DEFAULT_WINDOW, parseSpelledPitch, spellKey, type SpelledPitch } from '../../src/pitch/index.js';
import { loadTuningPreset } from '../../src/presets/tuning-presets.js';
import { A440, parseReference } from '../../src/tuning/index.js';
import { Rig } from '../support/rig.js';
import { scriptedSpeller } from '../support/spellers.js';

const meantone = loadTuningPreset('meantone-1-4').tuning;
/** MTS resolution is 100/16384 cent; the error is at most half of it. */
const MTS = 0.0031;

/** A test speller: channel 1 plays the flat of each black key, every other channel the window's sharps. */
const byChannel = scriptedSpeller((n) => (n.channel === 1 ? parseSpelledPitch('Ab4') : spellKey(DEFAULT_WINDOW, n.key)));
const speller = (spell: (key: number) => SpelledPitch) => scriptedSpeller((n) => spell(n.key));
const A_FLAT_4 = parseSpelledPitch('Ab4');

describe('mts-note output', () => {
  it('retunes each key before its note-on and sounds the exact spelling', () => {
    const rig = new Rig({ tuning: meantone, reference: A440, mode: 'mts-note', channels: [0] });
    for (const key of [60, 61, 63, 66, 68, 70, 72]) rig.on(key);
    expect(rig.worstError()).toBeLessThan(MTS);
    const sysex = rig.sent.filter((m) => m.data[0] === 0xf0);
    expect(sysex).toHaveLength(7);
    // Each tuning change comes right before its note-on.
    rig.sent.forEach((m, i) => {
      if (m.data[0] === 0xf0) expect(rig.sent[i + 1]?.data[0]).toBe(0x90);
    });
  });

  it('sends no retune for a key already tuned to the spelling', () => {
    const rig = new Rig({ tuning: meantone, reference: A440, mode: 'mts-note', channels: [0] });
    rig.on(60).off(60).after(1000).on(60);
    expect(rig.sent.filter((m) => m.data[0] === 0xf0)).toHaveLength(1);
  });

  it('takes a nearby slot when G♯ and A♭ of one key sound together, and never retunes a sounding slot', () => {
    const rig = new Rig({ tuning: meantone, reference: A440, mode: 'mts-note', channels: [0], speller: byChannel });
    rig.on(68);
    // Same key, A♭ this time (from a second manual on channel 2).
    rig.send([0x91, 68, 100], A_FLAT_4);
    const slots = rig.model.active().map((v) => v.key);
    expect(new Set(slots).size).toBe(2);
    expect(rig.worstError()).toBeLessThan(MTS);
    // Let the A♭ go; the G♯ still rings: its slot keeps its tuning.
    rig.send([0x81, 68, 0]);
    rig.after(10).send([0x91, 68, 100], A_FLAT_4);
    expect(rig.worstError()).toBeLessThan(MTS);
  });

  it('respects the release guard: a ringing slot is not retuned, another is used', () => {
    const names = { 68: 'G#4', 69: 'A4' };
    let current = 'G#4';
    const spell = (key: number) => parseSpelledPitch(key === 68 ? current : (names as Record<number, string>)[key]!);
    const rig = new Rig({ tuning: meantone, reference: A440, mode: 'mts-note', channels: [0], speller: speller(spell) }, spell);
    rig.on(68).off(68);
    current = 'Ab4';
    rig.after(100).on(68);
    expect(rig.voice(68).key).not.toBe(68); // slot 68 is still ringing G♯
    expect(rig.worstError()).toBeLessThan(MTS);
    rig.off(68);
    current = 'G#4';
    rig.after(1000).on(68);
    expect(rig.voice(68).key).toBe(68);
  });

  it('tunes against the synth’s own A4 and reaches references far from 440', () => {
    const rig = new Rig({ tuning: meantone, reference: parseReference('A4=392'), mode: 'mts-note', channels: [0], synthA4: 443 });
    rig.on(69).on(57);
    expect(rig.model.frequency(rig.voice(69))).toBeCloseTo(392, 3);
    expect(rig.worstError()).toBeLessThan(MTS);
  });
});

describe('mts-octave output', () => {
  it('sends a scale/octave table at start and tunes the window’s spellings (2-byte form)', () => {
    const rig = new Rig({ tuning: meantone, reference: A440, mode: 'mts-octave', channels: [0] });
    expect(rig.sent.filter((m) => m.data[0] === 0xf0 && m.data[4] === 0x09)).toHaveLength(1);
    for (const key of [60, 61, 63, 64, 66, 68, 70]) rig.on(key);
    expect(rig.worstError()).toBeLessThan(0.0062); // 100/8192 per step
  });

  it('uses the 1-byte form to the nearest cent', () => {
    const rig = new Rig({ tuning: meantone, reference: A440, mode: 'mts-octave', channels: [0], octaveForm: 1 });
    expect(rig.sent.some((m) => m.data[0] === 0xf0 && m.data[4] === 0x08)).toBe(true);
    rig.on(68).on(63);
    expect(rig.worstError()).toBeLessThan(0.5);
  });

  it('moves every key by one shift when the reference is far from the synth (A4 = 415)', () => {
    const rig = new Rig({ tuning: meantone, reference: parseReference('A4=415'), mode: 'mts-octave', channels: [0], octaveForm: 1 });
    rig.on(69);
    expect(rig.voice(69).key).toBe(68);
    expect(rig.model.frequency(rig.voice(69))).toBeCloseTo(415, 0);
  });

  it('sends the table again when a key class changes spelling; a held note of that class moves (its documented limit)', () => {
    const rig = new Rig({ tuning: meantone, reference: A440, mode: 'mts-octave', channels: [0], speller: byChannel });
    const tables = () => rig.sent.filter((m) => m.data[0] === 0xf0).length;
    rig.on(68);
    const gSharp = rig.model.frequency(rig.voice(68));
    expect(tables()).toBe(1);
    rig.send([0x91, 68, 100], A_FLAT_4);
    expect(tables()).toBe(2);
    const aFlat = rig.model.active().map((v) => rig.model.frequency(v));
    // Both voices now sound A♭: the held G♯ moved up by the lesser diesis, 41.06 cents.
    for (const hz of aFlat) expect(1200 * Math.log2(hz / gSharp)).toBeCloseTo(41.059, 1);
  });
});

describe('pass output', () => {
  it('plays the synth’s own 12-ET: same keys, no tuning messages', () => {
    const rig = new Rig({ tuning: meantone, reference: A440, mode: 'pass', channels: [2] });
    rig.on(68).wheel(10000);
    expect(rig.voice(68)).toMatchObject({ channel: 2, key: 68 });
    expect(rig.model.frequency(rig.voice(68))).toBeCloseTo(440 * 2 ** (-1 / 12) * 2 ** (rig.wheelCents / 1200), 6);
    expect(rig.sent.some((m) => m.data[0] === 0xf0)).toBe(false);
  });
});
