import { describe, expect, it } from 'vitest';
import { formatSpelledPitch, parseSpelledPitch } from '../../src/pitch/index.js';
import { checkSetup } from '../../src/presets/setup-file.js';
import { loadTuningPreset } from '../../src/presets/tuning-presets.js';
import { ControlMap } from '../../src/spelling/control-map.js';
import { ControlledSpeller } from '../../src/spelling/controlled.js';
import { createStrategy, type Strategy } from '../../src/spelling/strategy.js';
import { A440, frequency } from '../../src/tuning/index.js';
import { Rig } from '../support/rig.js';

const meantone = loadTuningPreset('meantone-1-4').tuning;

/** A rig whose speller and controls come from a setup's JSON, as on stage. */
function rigFor(setup: object, strategy: Strategy = 'fixed', tuning = meantone): { rig: Rig; speller: ControlledSpeller } {
  const { setup: parsed, problems } = checkSetup(JSON.stringify(setup), 'test.json');
  if (!parsed) throw new Error(problems.map((p) => `${p.path}: ${p.message}`).join('; '));
  const speller = new ControlledSpeller(createStrategy({ strategy, key: parsed.key, window: parsed.window }), parsed.splits);
  const controls = new ControlMap(parsed.bindings, speller);
  const rig = new Rig({ tuning, reference: A440, layout: 'multi', bendRange: 2, speller, controls }, (key) => speller.peek({ key, velocity: 0, time: 0, channel: 0, source: 0 }));
  return { rig, speller };
}

const lastNote = (rig: Rig): string => {
  const e = [...rig.events].reverse().find((x) => x.type === 'note');
  return e && e.type === 'note' ? formatSpelledPitch(e.pitch) : 'none';
};
const forwarded = (rig: Rig, from: number) => rig.sent.slice(from).map((m) => m.data);

describe('the control map', () => {
  it('flips new notes while a bound pedal is down, and consumes the pedal', () => {
    const { rig } = rigFor({ controls: [{ cc: 66, action: 'flip' }] });
    const before = rig.sent.length;
    rig.cc(66, 127).on(68);
    expect(lastNote(rig)).toBe('Ab4');
    rig.cc(66, 0).on(70);
    expect(lastNote(rig)).toBe('Bb4'); // back to the window's own spelling
    expect(forwarded(rig, before).some((d) => d[1] === 66)).toBe(false);
    expect(rig.worstError()).toBeLessThan(0.0123);
  });

  it('leaves an unbound sustain pedal alone', () => {
    const { rig } = rigFor({ controls: [{ cc: 66, action: 'flip' }] });
    const before = rig.sent.length;
    rig.cc(64, 127);
    expect(forwarded(rig, before)).toContainEqual([0xb1, 64, 127]);
  });

  it('latches a flip on a key switch that never sounds', () => {
    const { rig } = rigFor({ controls: [{ note: 24, channel: 16, action: 'flip', latch: true }] });
    const before = rig.sent.length;
    rig.send([0x9f, 24, 100]).length;
    rig.send([0x8f, 24, 0]).length;
    expect(forwarded(rig, before)).toEqual([]); // the key switch is consumed
    rig.on(61);
    expect(lastNote(rig)).toBe('Db4');
    rig.send([0x9f, 24, 100]);
    rig.on(63);
    expect(lastNote(rig)).toBe('Eb4'); // unlatched: the window again
    rig.send([0x90, 24, 100], 24); // the same key on another channel is an ordinary note
    expect(lastNote(rig)).toBe('C1');
  });

  it('forces flats and sharps from the zones of an expression pedal', () => {
    const { rig } = rigFor({ controls: [{ cc: 4, zones: [{ from: 0, to: 40, action: 'force-flats' }, { from: 88, to: 127, action: 'force-sharps' }] }] });
    rig.cc(4, 10).on(66);
    expect(lastNote(rig)).toBe('Gb4');
    rig.cc(4, 64).on(63);
    expect(lastNote(rig)).toBe('Eb4');
    rig.cc(4, 120).on(70);
    expect(lastNote(rig)).toBe('A#4');
  });

  it('shifts the window one step at a time, and sets a key from a program change', () => {
    const { rig } = rigFor({ controls: [{ note: 25, channel: 16, action: 'shift-sharp' }, { note: 23, channel: 16, action: 'shift-flat' }, { program: 5, action: 'set-key', key: 'Db major' }] });
    rig.send([0x9f, 25, 1]);
    rig.on(63);
    expect(lastNote(rig)).toBe('D#4'); // E..A#
    rig.send([0x8f, 25, 0]);
    rig.send([0x9f, 23, 1]);
    rig.send([0x9f, 23, 0]);
    rig.send([0x9f, 23, 1]);
    rig.on(68);
    expect(lastNote(rig)).toBe('Ab4'); // up one, down two: Ab..C#, one flatward of Eb..G#
    rig.send([0xc0, 5]);
    rig.on(61);
    expect(lastNote(rig)).toBe('Db4');
    rig.on(64);
    expect(lastNote(rig)).toBe('Fb4'); // D♭ major's window, Fb..A, takes the lowered third (setting a key clears the shift)
  });

  it('respells a sustained chord in place: the channel is retuned, nothing is struck again', () => {
    const { rig } = rigFor({ controls: [{ note: 26, channel: 16, action: 'respell' }, { cc: 66, action: 'flip', latch: true }] });
    rig.cc(64, 127).on(56).on(68).off(56).off(68); // G♯3 and G♯4 ring under the pedal
    const noteOns = () => rig.sent.filter((m) => (m.data[0]! & 0xf0) === 0x90 && m.data[2]! > 0).length;
    const struck = noteOns();
    rig.cc(66, 127); // flip, latched
    rig.send([0x9f, 26, 1]);
    expect(noteOns()).toBe(struck);
    const aFlat = frequency(meantone, A440, parseSpelledPitch('Ab4'));
    const ringing = rig.model.active().map((v) => rig.model.frequency(v)).sort((a, b) => a - b);
    expect(ringing[1]!).toBeCloseTo(aFlat, 2);
    expect(ringing[0]!).toBeCloseTo(aFlat / 2, 2);
  });

  it('strikes a held note again when its channel cannot be retuned alone', () => {
    const { rig } = rigFor({ controls: [{ note: 26, channel: 16, action: 'respell' }, { cc: 66, action: 'flip', latch: true }] });
    rig.on(68).on(63); // G♯ and E♭ held on two channels
    rig.cc(66, 127).send([0x9f, 26, 1]);
    const sounding = rig.model.active().map((v) => Math.round(rig.model.frequency(v) * 100) / 100).sort((a, b) => a - b);
    expect(sounding).toEqual(
      [frequency(meantone, A440, parseSpelledPitch('D#4')), frequency(meantone, A440, parseSpelledPitch('Ab4'))].map((f) => Math.round(f * 100) / 100).sort((a, b) => a - b),
    );
  });

  it('toggles a 12-ET pass for comparison, and panics from a key', () => {
    const { rig } = rigFor({ controls: [{ note: 27, channel: 16, action: 'pass' }, { note: 28, channel: 16, action: 'panic' }] });
    rig.send([0x9f, 27, 1]);
    rig.on(68);
    expect(rig.model.frequency(rig.model.active()[0]!)).toBeCloseTo(440 * 2 ** (-1 / 12), 3);
    rig.send([0x9f, 27, 1]).length;
    rig.on(70);
    rig.send([0x9f, 28, 1]);
    expect(rig.model.active()).toEqual([]);
    expect(rig.router.soundingCount).toBe(0);
  });

  it('gives a second manual the alternates through a split-key map', () => {
    const { rig } = rigFor({ splitKeys: [{ channel: 2, window: 'Gb..B' }, { channel: 1, key: 70, spelling: 'A#' }] });
    rig.on(66);
    expect(lastNote(rig)).toBe('F#4');
    rig.send([0x91, 66, 90]);
    expect(lastNote(rig)).toBe('Gb4');
    rig.on(70);
    expect(lastNote(rig)).toBe('A#4');
  });

  it('freezes a following speller', () => {
    const { rig } = rigFor({ controls: [{ cc: 67, action: 'freeze' }] }, 'follow');
    rig.cc(67, 127);
    for (let i = 0; i < 12; i++) rig.on(64).on(68).on(71).after(200).off(64).off(68).off(71);
    rig.on(56);
    expect(lastNote(rig)).toBe('G#3'); // C major's window holds G♯ anyway…
    rig.cc(67, 0);
    for (let i = 0; i < 12; i++) rig.on(60).on(63).on(67).after(200).off(60).off(63).off(67);
    rig.on(56);
    expect(lastNote(rig)).toBe('Ab3'); // …but after C minor, unfrozen, it is A♭
  });
});

describe('the engine with the key strategy and chord gathering', () => {
  it('moves a just table to the declared key’s tonic: D–F♯ a pure 5/4', () => {
    const { rig } = rigFor({ spelling: { key: 'D major' } }, 'key', loadTuningPreset('just-major').tuning);
    rig.on(62).on(66).on(69);
    const [d, fSharp, a] = [62, 66, 69].map((k) => rig.model.frequency(rig.voice(k)));
    expect(fSharp! / d!).toBeCloseTo(5 / 4, 4);
    expect(a! / d!).toBeCloseTo(3 / 2, 4);
  });

  it('waits the gather time live and spells the chord together', () => {
    const speller = new ControlledSpeller(createStrategy({ strategy: 'follow' }));
    const rig = new Rig({ tuning: meantone, reference: A440, layout: 'multi', bendRange: 2, speller, gather: 8 }, () => parseSpelledPitch('C4'));
    rig.send([0x90, 64, 90]);
    rig.after(3).send([0x90, 68, 90]);
    expect(rig.model.active()).toHaveLength(0); // still gathering
    rig.after(3).send([0x90, 71, 90]);
    rig.deliver(rig.router.tick(rig.time + 3));
    expect(rig.model.active()).toHaveLength(3);
    const spelled = rig.events.filter((e) => e.type === 'note').map((e) => (e.type === 'note' ? formatSpelledPitch(e.pitch) : ''));
    expect(spelled).toEqual(['E4', 'G#4', 'B4']);
  });
});

describe('setup files', () => {
  it('names the JSON path of every problem', () => {
    const { problems } = checkSetup(
      JSON.stringify({ spelling: { strategy: 'guess', key: 'H minor' }, controls: [{ cc: 64 }, { note: 3, program: 4, action: 'flip' }, { program: 2, action: 'set-key' }], splitKeys: [{ key: 60 }] }),
      'setup.json',
    );
    const text = problems.map((p) => `${p.path}: ${p.message}`);
    expect(text.some((t) => t.startsWith('$.spelling.strategy:'))).toBe(true);
    expect(text.some((t) => t.startsWith('$.controls[0]:') && t.includes('either "action" or "zones"'))).toBe(true);
    expect(text.some((t) => t.startsWith('$.controls[1]:') && t.includes('exactly one of'))).toBe(true);
    expect(text.some((t) => t.startsWith('$.splitKeys[0]:'))).toBe(true);
    const second = checkSetup(JSON.stringify({ spelling: { key: 'H minor' }, controls: [{ program: 2, action: 'set-key' }] }), 'setup.json').problems.map((p) => `${p.path}: ${p.message}`);
    expect(second).toEqual(['$.spelling.key: key "H minor" is not a key: write a tonic and a mode, as in "D minor", "Dm", "D major", "F# minor", "Bb major", "E flat major", "E phrygian"', '$.controls[0]: "set-key" needs a "key", such as "D minor"']);
  });
});
