import { describe, expect, it } from 'vitest';
import { DEFAULT_WINDOW, spellKey } from '../../src/pitch/index.js';
import { checkSetup } from '../../src/presets/setup-file.js';
import { loadTuningPreset } from '../../src/presets/tuning-presets.js';
import { PitchTable } from '../../src/router/pitch-table.js';
import { TuningInForce, type TuningChange } from '../../src/router/tuning-in-force.js';
import { ControlMap } from '../../src/spelling/control-map.js';
import { ControlledSpeller } from '../../src/spelling/controlled.js';
import { fixedSpeller } from '../../src/spelling/speller.js';
import { A440, parseReference } from '../../src/tuning/index.js';
import { Rig } from '../support/rig.js';
import { SynthModel } from '../../src/synth/reference-synth.js';

const meantone = loadTuningPreset('meantone-1-4');
const pythagorean = loadTuningPreset('pythagorean');
const toPythagorean: TuningChange = { id: pythagorean.id, name: pythagorean.name, tuning: pythagorean.tuning };

// Independent arithmetic (from the definitions, not from the tuning core):
// Pythagorean: A4 is three pure fifths above C4 less an octave (27/16), E4 is 81/64 above C4,
// so E4 = 440 · 16/27 · 81/64 = 330 Hz exactly.
const PYTHAGOREAN_E4_AT_440 = 330;
// Quarter-comma meantone: the fifth is 5^(1/4), A4 = C4 · 5^(3/4) / 2 and E4 = C4 · 5/4 (a pure third),
// so E4 = 440 · 2 / 5^(3/4) · 5/4 = 1100 / 5^(3/4) ≈ 328.98 Hz.
const MEANTONE_E4_AT_440 = 1100 / 5 ** 0.75;
const cents = (a: number, b: number): number => 1200 * Math.log2(a / b);
/** The bend's step at ±48 semitones is 0.59 cent: a voice is within half of it. */
const AT_48 = 0.3;

function controlled(): ControlledSpeller {
  return new ControlledSpeller(fixedSpeller(DEFAULT_WINDOW));
}

describe('TuningInForce: what new notes are tuned with', () => {
  it('changes the tables and keeps the reference when the change names none', () => {
    const force = new TuningInForce(new PitchTable(meantone.tuning, parseReference('A4=415'), 440), { id: meantone.id, name: meantone.name });
    expect(force.id).toBe('meantone-1-4');
    force.change(toPythagorean);
    expect(force.tuning).toBe(pythagorean.tuning);
    expect(force.reference.hz.valueOf()).toBe(415);
    expect(force.id).toBe('pythagorean');
    force.change({ ...toPythagorean, reference: A440 });
    expect(force.reference.hz.valueOf()).toBe(440);
    // E4 at A4 = 440 in Pythagorean tuning, from the new table.
    expect(force.tables.now(false, () => undefined).tune(spellKey(DEFAULT_WINDOW, 64)).hz).toBeCloseTo(PYTHAGOREAN_E4_AT_440, 6);
  });

  it('takes a synth retuned between pieces (its own A4) when the change gives one', () => {
    const force = new TuningInForce(new PitchTable(pythagorean.tuning, A440, 440));
    const a4 = spellKey(DEFAULT_WINDOW, 69);
    expect(force.tables.now(false, () => undefined).tune(a4).offset.cents).toBeCloseTo(0, 9);
    force.change({ ...toPythagorean, synthA4: 415 });
    // A4 = 440 Hz on a synth whose own A4 is 415: 1200·log2(440/415) ≈ 101.3 cents above its key 69.
    expect(force.tables.now(false, () => undefined).tune(a4).offset.cents).toBeCloseTo(1200 * Math.log2(440 / 415), 9);
    force.change(toPythagorean);
    expect(force.tables.now(false, () => undefined).tune(a4).offset.cents).toBeCloseTo(1200 * Math.log2(440 / 415), 9); // kept until changed again
  });

  it('makes an adaptive tuner only for an adaptive tuning', () => {
    const force = new TuningInForce(new PitchTable(meantone.tuning, A440, 440));
    expect(force.adaptive).toBeUndefined();
    const adaptive = loadTuningPreset('just-adaptive');
    force.change({ id: adaptive.id, name: adaptive.name, tuning: adaptive.tuning });
    expect(force.adaptive).toBeDefined();
    force.change(toPythagorean);
    expect(force.adaptive).toBeUndefined();
  });
});

describe('set-tuning: new notes take the new tuning, notes sounding finish in theirs', () => {
  it('bend output: a held E4 stays in meantone while a new E4 sounds Pythagorean (measured at the reference synth)', () => {
    const speller = controlled();
    const rig = new Rig({ tuning: meantone.tuning, reference: A440, speller, controls: new ControlMap([], speller) });
    rig.at(0).cc(64, 127).on(64).on(60).off(64).off(60); // E4 and C4 held by the sustain pedal
    const held = rig.voice(64);
    expect(cents(rig.model.frequency(held), MEANTONE_E4_AT_440)).toBeCloseTo(0, 0);
    rig.at(10).deliver(rig.router.act(10, { action: { name: 'set-tuning', tuning: toPythagorean }, on: true }));
    expect(rig.events.some((e) => e.type === 'tuning' && e.tuningId === 'pythagorean')).toBe(true);
    rig.at(20).on(76); // E5 in the new tuning
    const fresh = rig.voice(76);
    expect(Math.abs(cents(rig.model.frequency(fresh), 2 * PYTHAGOREAN_E4_AT_440))).toBeLessThan(AT_48);
    // The held note did not move: still meantone's E4, on its own channel.
    expect(Math.abs(cents(rig.model.frequency(held), MEANTONE_E4_AT_440))).toBeLessThan(AT_48);
    expect(fresh.channel).not.toBe(held.channel);
    // Through the release tail too, and nothing is stuck once the pedal is up.
    rig.at(30).off(76).cc(64, 0);
    expect(Math.abs(cents(rig.model.frequency(held), MEANTONE_E4_AT_440))).toBeLessThan(AT_48);
    rig.after(1000);
    expect(rig.model.active()).toHaveLength(0);
    expect(rig.router.soundingCount).toBe(0);
  });

  it('a reference change moves new notes only: A4 = 415 after A4 = 440', () => {
    const speller = controlled();
    const rig = new Rig({ tuning: pythagorean.tuning, reference: A440, speller, controls: new ControlMap([], speller) });
    rig.at(0).on(69);
    rig.deliver(rig.router.act(5, { action: { name: 'set-tuning', tuning: { ...toPythagorean, reference: parseReference('A4=415') } }, on: true }));
    rig.at(10).on(57); // A3
    expect(Math.abs(cents(rig.model.frequency(rig.voice(69)), 440))).toBeLessThan(AT_48);
    expect(Math.abs(cents(rig.model.frequency(rig.voice(57)), 207.5))).toBeLessThan(AT_48);
    rig.at(20).off(69).off(57).after(1000);
    expect(rig.model.active()).toHaveLength(0);
  });

  it('is bound in a setup like set-key: the tuning is loaded when the setup is checked, a pedal fires it', () => {
    const text = JSON.stringify({ controls: [{ cc: 80, action: 'set-tuning', tuning: 'pythagorean', reference: 'A4=440' }] });
    const { setup, problems } = checkSetup(text, 'stage.json');
    expect(problems).toEqual([]);
    const speller = controlled();
    const rig = new Rig({ tuning: meantone.tuning, reference: parseReference('A4=415'), speller, controls: new ControlMap(setup!.bindings, speller) });
    rig.at(0).cc(80, 127).cc(80, 0).on(64);
    expect(Math.abs(cents(rig.model.frequency(rig.voice(64)), PYTHAGOREAN_E4_AT_440))).toBeLessThan(AT_48);
    // The pedal is consumed: the synth never sees controller 80.
    expect(rig.sent.some((m) => (m.data[0]! & 0xf0) === 0xb0 && m.data[1] === 80)).toBe(false);
  });

  it('check: a set-tuning control without a tuning, with an unknown one, or adaptive on a 12-class output', () => {
    const text = JSON.stringify({
      output: { mode: 'mts-octave' },
      controls: [
        { cc: 80, action: 'set-tuning' },
        { cc: 81, action: 'set-tuning', tuning: 'pythagorian' },
        { cc: 82, action: 'set-tuning', tuning: 'just-adaptive' },
        { cc: 83, action: 'set-tuning', tuning: 'pythagorean', reference: 'A4=five' },
      ],
    });
    const { setup, problems } = checkSetup(text, 'stage.json');
    expect(setup).toBeUndefined();
    expect(problems.map((p) => p.path)).toEqual(['$.controls[0]', '$.controls[1].tuning', '$.controls[3].reference', '$.controls[2].tuning']);
    expect(problems[0]!.message).toMatch(/needs a "tuning"/u);
    expect(problems[1]!.message).toMatch(/did you mean pythagorean/u);
    expect(problems[3]!.message).toMatch(/held notes would move/u);
  });

  it('mts-octave (12 key classes): a held note moves only when its key class is played in the new tuning', () => {
    const speller = controlled();
    const rig = new Rig({ tuning: meantone.tuning, reference: A440, mode: 'mts-octave', speller, controls: new ControlMap([], speller) });
    rig.at(0).on(64).on(60);
    rig.deliver(rig.router.act(5, { action: { name: 'set-tuning', tuning: toPythagorean }, on: true }));
    rig.at(10).on(67); // G: another key class, the held E and C keep meantone
    expect(Math.abs(cents(rig.model.frequency(rig.voice(64)), MEANTONE_E4_AT_440))).toBeLessThan(1);
    rig.at(20).on(76); // E5: the E key class is retuned, and the held E4 with it (the limit of 12-class tuning)
    expect(Math.abs(cents(rig.model.frequency(rig.voice(64)), PYTHAGOREAN_E4_AT_440))).toBeLessThan(1);
  });

  it('mts-octave: a synth that comes back after a set-tuning gets the tuning in force on every key class', () => {
    const speller = controlled();
    const rig = new Rig({ tuning: meantone.tuning, reference: A440, mode: 'mts-octave', speller, controls: new ControlMap([], speller) });
    rig.at(0).on(60).off(60);
    rig.deliver(rig.router.act(5, { action: { name: 'set-tuning', tuning: toPythagorean }, on: true }));
    // The output port goes and returns (src/live/bridge.ts): panic, then the set-up messages again, into a synth that starts afresh.
    const synth = new SynthModel(440, 0);
    for (const m of [...rig.router.panic(100, 'output back'), ...rig.router.start(100)]) synth.receive(m.time, m.data);
    // The synth's own table, played directly (no retune from diesis before it): E4 and A4 before any key is played again.
    const e4 = synth.receive(110, [0x90, 64, 100])!;
    expect(Math.abs(cents(synth.frequency(e4), PYTHAGOREAN_E4_AT_440))).toBeLessThan(0.1);
    const a4 = synth.receive(110, [0x90, 69, 100])!;
    expect(Math.abs(cents(synth.frequency(a4), 440))).toBeLessThan(0.1);
  });

  it('adaptive tuning after a fixed one: new chords are tuned by a fresh tuner, the held note stays', () => {
    const speller = controlled();
    const adaptive = loadTuningPreset('just-adaptive');
    const rig = new Rig({ tuning: meantone.tuning, reference: A440, speller, controls: new ControlMap([], speller) });
    rig.at(0).on(64);
    rig.deliver(rig.router.act(5, { action: { name: 'set-tuning', tuning: { id: adaptive.id, name: adaptive.name, tuning: adaptive.tuning } }, on: true }));
    rig.at(10).on(48).on(55); // C3, then G3: a pure fifth above it (3/2)
    expect(Math.abs(cents(rig.model.frequency(rig.voice(64)), MEANTONE_E4_AT_440))).toBeLessThan(AT_48);
    expect(Math.abs(cents(rig.model.frequency(rig.voice(55)) / rig.model.frequency(rig.voice(48)), 1.5))).toBeLessThan(2 * AT_48);
    rig.at(20).off(64).off(48).off(55).after(1000);
    expect(rig.model.active()).toHaveLength(0);
  });
});
