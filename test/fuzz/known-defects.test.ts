import { describe, expect, it } from 'vitest';
import type { TimedMessage } from '../../src/midi/bytes.js';
import { DEFAULT_WINDOW, keyOf, parseSpelledPitch, spellKey, type SpelledPitch } from '../../src/pitch/index.js';
import { loadTuningPreset } from '../../src/presets/tuning-presets.js';
import type { RouterEvent } from '../../src/router/router.js';
import { createEngine, createRouter, type EngineOptionsInput } from '../../src/router/setup.js';
import { SynthModel, type ModelVoice } from '../../src/synth/reference-synth.js';
import { A440, frequency } from '../../src/tuning/index.js';
import { InvariantChecker } from '../support/invariants.js';
import { scriptedSpeller } from '../support/spellers.js';

// The defects of issue 11 that the fuzz test's generator leaves out while they are open
// (FuzzFlags.knownDefects, test/support/fuzz.ts), each as a focused test of the behaviour the issue
// asks for. They fail today and are marked `it.fails`; flip each to `it` once its fix is in.
// The synth is the reference synth (src/synth/reference-synth.ts, from the MIDI 1.0, MPE and MTS
// documents).

const meantone = loadTuningPreset('meantone-1-4').tuning;
const hz = (name: string) => frequency(meantone, A440, parseSpelledPitch(name));

/** An engine wired to the reference synth; `send` feeds bytes from a source at a time. */
function engine(options: Partial<EngineOptionsInput>, spell?: (key: number) => SpelledPitch) {
  const events: RouterEvent[] = [];
  const { router, tally } = createEngine({
    tuning: meantone,
    reference: A440,
    ...options,
    ...(spell ? { speller: scriptedSpeller((n) => spell(n.key)) } : {}),
    observer: (e) => events.push(e),
  });
  const synth = new SynthModel(440, 400);
  /** Every voice's frequency after every single message. */
  const trace: Array<Map<ModelVoice, number>> = [];
  const deliver = (out: readonly TimedMessage[]): ModelVoice[] => {
    const started: ModelVoice[] = [];
    for (const m of out) {
      const v = synth.receive(m.time, m.data);
      if (v) started.push(v);
      trace.push(new Map(synth.sounding().map((x) => [x, synth.frequency(x)])));
    }
    return started;
  };
  deliver(router.start(0));
  const send = (time: number, bytes: number[], source = 0) => deliver(router.process(time, bytes, source));
  return { router, tally, synth, events, trace, deliver, send };
}

describe('issue 11, item 1: a device that disappears takes its pedals with it', () => {
  it('(a) a pedal box unplugged while its sustain pedal holds released notes: the notes end', () => {
    const { router, synth, send, deliver } = engine({});
    send(0, [0xb0, 64, 127], 1); // the pedal box (source 1): sustain down
    for (const k of [60, 64, 67]) send(10, [0x90, k, 90], 0);
    for (const k of [60, 64, 67]) send(20, [0x80, k, 0], 0); // keys up: the pedal holds them
    expect(synth.active()).toHaveLength(3);
    deliver(router.releaseSource(30, 1)); // the pedal box is unplugged
    expect(synth.active()).toEqual([]);
    expect(router.sustainDown).toBe(false);
  });

  it('(b) a keyboard unplugged mid-chord with its own pedal down: the chord ends at once', () => {
    const { router, synth, send, deliver } = engine({});
    send(0, [0xb0, 64, 127], 0);
    for (const k of [60, 64, 67]) send(10, [0x90, k, 90], 0);
    deliver(router.releaseSource(30, 0)); // README: "an input that disappears has its notes released at once"
    expect(synth.active()).toEqual([]);
  });
});

describe('issue 11, item 3: Reset All Controllers in the multi layout', () => {
  it('never lets a sounding note drop to 12-ET, not even between two messages of one burst', () => {
    const { synth, send, trace } = engine({ layout: 'multi', bendRange: 2, channels: [0, 1, 2, 3] });
    const [gSharp] = send(0, [0x90, 68, 90]);
    const tuned = synth.frequency(gSharp!);
    expect(Math.abs(1200 * Math.log2(tuned / hz('G#4')))).toBeLessThan(0.02); // meantone G♯4, 411.22 Hz
    const from = trace.length;
    send(10, [0xb0, 121, 0]); // the wheel was centred: nothing may move
    for (const step of trace.slice(from)) expect(step.get(gSharp!)).toBeCloseTo(tuned, 6);
  });
});

describe('issue 11, item 4: mts-note and a slot the pedal still holds', () => {
  it('a steal never retunes a pedal-held note under the player: the sustained G♯4 keeps 411.22 Hz', () => {
    // G♯4 first, A♭4 later on the same key; every other key spelled from the default window.
    let key68 = parseSpelledPitch('G#4');
    const { synth, send, events } = engine({ mode: 'mts-note', channels: [0] }, (k) => (k === 68 ? key68 : spellKey(DEFAULT_WINDOW, k)));
    send(0, [0xb0, 64, 127]);
    const [gSharp] = send(10, [0x90, 68, 90]);
    send(20, [0x80, 68, 0]); // the pedal holds it
    expect(synth.frequency(gSharp!)).toBeCloseTo(hz('G#4'), 2);
    for (let k = 0; k < 128; k++) if (k !== 68) send(1000, [0x90, k, 60]); // every other slot sounds: a steal is needed
    key68 = parseSpelledPitch('Ab4');
    expect(keyOf(key68)).toBe(68);
    const [aFlat] = send(1010, [0x90, 68, 90]);
    // Under the pedal no slot can be silenced, so the new note is refused (and said so) rather than heard retuning another.
    expect(aFlat).toBeUndefined();
    expect(events.filter((e) => e.type === 'note-dropped').map((e) => e.type === 'note-dropped' && e.reason)).toEqual(['all 128 tuning slots are sounding and a pedal holds them']);
    expect(synth.frequency(gSharp!)).toBeCloseTo(hz('G#4'), 2);
  });

  it('without a pedal a steal silences the oldest slot before retuning it, and the new note sounds', () => {
    let key68 = parseSpelledPitch('G#4');
    const { synth, send } = engine({ mode: 'mts-note', channels: [0] }, (k) => (k === 68 ? key68 : spellKey(DEFAULT_WINDOW, k)));
    const [gSharp] = send(10, [0x90, 68, 90]);
    for (let k = 0; k < 128; k++) if (k !== 68) send(1000, [0x90, k, 60]);
    key68 = parseSpelledPitch('Ab4');
    const [aFlat] = send(1010, [0x90, 68, 90]);
    expect(synth.frequency(aFlat!)).toBeCloseTo(hz('Ab4'), 2); // 421.09 Hz
    // The oldest (G♯4) was stolen: its note-off came first, so only its release tail can move (one MTS channel has no way to cut one key's tail).
    expect(gSharp!.state).toBe('tail');
  });
});

describe('issue 11, item 7: mts-note below the lowest frequency MTS can express', () => {
  it('a B♯−2 of 8.03 Hz is reported out of range, like any note the output cannot tune', () => {
    const bSharp = parseSpelledPitch('B#-2');
    expect(keyOf(bSharp)).toBe(0);
    // MTS's lowest frequency is key 0 in 12-ET at A4 = 440 Hz, 8.1758 Hz (MIDI Tuning Standard).
    expect(hz('B#-2')).toBeLessThan(440 * 2 ** (-69 / 12));
    const { tally, events, send } = engine({ mode: 'mts-note', channels: [0] }, (k) => (k === 0 ? bSharp : spellKey(DEFAULT_WINDOW, k)));
    send(0, [0x90, 0, 90]);
    expect(events.filter((e) => e.type === 'out-of-range')).toHaveLength(1);
    expect(tally.outOfRange).toBe(1);
  });
});

describe('found by the fuzz test, not in issue 11: release tails after an active-sensing panic', () => {
  it('a note within the release time after the panic does not retune a channel whose tails still ring', () => {
    const checker = new InvariantChecker({ mode: 'bend', tailMs: 400 });
    const router = createRouter({
      tuning: meantone,
      reference: A440,
      channels: [1, 2], // two member channels, so the third tuning needs one of them
      observer: (e) => e.type === 'panic' && checker.panicking(),
    });
    const feed = (bytes: number[] | undefined, out: (time: number) => readonly TimedMessage[], time: number) => {
      checker.input(bytes ? [bytes] : []);
      for (const m of out(time)) checker.output(m.time, m.data);
    };
    feed(undefined, (t) => router.start(t), 0);
    feed([0xfe], (t) => router.process(t, [0xfe]), 0); // the keyboard sends active sensing
    feed([0x90, 68, 90], (t) => router.process(t, [0x90, 68, 90]), 10); // G♯4 on one channel
    feed([0x90, 64, 90], (t) => router.process(t, [0x90, 64, 90]), 20); // E4 on the other
    feed(undefined, (t) => router.tick(t), 400); // silence: the panic ends both, their tails ring
    expect(checker.synth.sounding()).toHaveLength(2);
    feed([0x90, 61, 90], (t) => router.process(t, [0x90, 61, 90]), 450); // C♯4 needs a third tuning
    expect(checker.counts.retunesUnderNotes).toBe(0);
  });
});
