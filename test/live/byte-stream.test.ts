import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { disableMidi, enableMidi } from '../../src/io/midi-system.js';
import { packetsForJzz, virtualInput, virtualOutput } from '../../src/io/virtual-ports.js';
import { Bridge } from '../../src/live/bridge.js';
import { LIVE_SYSEX_TIME_LIMIT_MS } from '../../src/midi/input-stream.js';
import { loadTuningPreset } from '../../src/presets/tuning-presets.js';
import { createEngine } from '../../src/router/setup.js';
import { malformation, SynthModel } from '../../src/synth/reference-synth.js';
import { A440 } from '../../src/tuning/index.js';
import { Prng } from '../support/prng.js';

// The byte stream below webmidi: diesis reads each input's packets from jzz's own port and parses
// them itself. The stream rules are MIDI 1.0's (Detailed Specification: running status; real-time
// bytes may appear anywhere, even inside another message; a system-exclusive message ends at F7
// or at the next status byte that is not real-time).

const meantone = loadTuningPreset('meantone-1-4').tuning;
const wait = (ms: number) => new Promise((r) => setTimeout(r, ms));
/** Waits until `condition` holds (jzz tells its watchers of a port change a moment later), failing after `ms`. */
async function until(condition: () => boolean, ms = 5000): Promise<void> {
  const end = Date.now() + ms;
  while (!condition()) {
    if (Date.now() > end) throw new Error('timed out waiting');
    await wait(2);
  }
}

beforeAll(async () => {
  await enableMidi({ virtualOnly: true });
});
afterAll(async () => {
  await disableMidi();
});

let counter = 0;
/** A virtual keyboard and pedal box, the reference synth behind a virtual output, and a bridge between them. */
async function stage() {
  const id = ++counter;
  const keyboard = virtualInput(`stream keyboard ${id}`);
  const pedals = virtualInput(`stream pedals ${id}`);
  const synth = new SynthModel(440, 0);
  const received: number[][] = [];
  const synthPort = virtualOutput(`stream synth ${id}`, (bytes) => {
    received.push(bytes);
    synth.receive(performance.now(), bytes);
  });
  const { router, tally } = createEngine({ tuning: meantone, reference: A440 });
  // Ports registered after MIDI started appear in webmidi's lists when it next looks.
  for (let tries = 0; !Bridge.portsPresent([keyboard.name, pedals.name], synthPort.name); tries++) {
    if (tries > 500) throw new Error('the virtual ports never appeared');
    await wait(10);
  }
  const bridge = Bridge.open({ inputs: [keyboard.name, pedals.name], output: synthPort.name, router });
  const noteOns = () => received.filter((m) => (m[0]! & 0xf0) === 0x90 && m[2]! > 0).length;
  return { keyboard, pedals, synth, received, router, tally, bridge, noteOns };
}

describe('a virtual device', () => {
  it("cuts its bytes only where jzz's message type would refuse a packet, so the stream arrives unchanged", () => {
    expect(packetsForJzz([0x90, 0xf8, 60, 100, 0xa0, 0x90, 1])).toEqual([[0x90], [0xf8, 60, 100, 0xa0, 0x90, 1]]); // jzz checks the second byte of a packet only
    expect(packetsForJzz([0x90, 60, 100, 0xf8, 62, 0])).toEqual([[0x90, 60, 100, 0xf8, 62, 0]]);
    expect(packetsForJzz([0xb0, 0xfe, 7])).toEqual([[0xb0, 0xfe, 7]]); // only note and poly-pressure statuses are checked by jzz
  });
});

describe('whole messages from any byte stream, through the live bridge on virtual ports', () => {
  it('running status: note-ons and note-offs (velocity 0) without repeated status bytes', async () => {
    const { keyboard, synth, noteOns, bridge } = await stage();
    keyboard.send([0x90, 60, 90, 64, 90, 67, 90]);
    expect(synth.active().map((v) => v.key).sort()).toEqual([60, 64, 67]);
    keyboard.send([0x90, 60, 0, 64, 0, 67, 0]);
    keyboard.send([0x80, 62, 0]);
    keyboard.send([0x90, 62, 80]);
    keyboard.send([0x80, 62, 0, 0x90]); // a status byte alone: the next packet completes it
    keyboard.send([65, 70, 65, 0]);
    expect(noteOns()).toBe(5);
    expect(synth.active()).toEqual([]);
    bridge.stop('test over');
  });

  it('real-time bytes inside messages (clock, start, stop) leave the message around them whole', async () => {
    const { keyboard, synth, received, noteOns, bridge } = await stage();
    keyboard.send([0x90, 0xf8, 60, 0xfa, 90]);
    keyboard.send([0x80, 60, 0xfc, 0]);
    keyboard.send([0x90, 62, 90, 0xf8, 62, 0]); // running status across a real-time byte
    expect(noteOns()).toBe(2);
    expect(synth.active()).toEqual([]);
    expect(received.filter((m) => m.length === 1 && m[0]! >= 0xf8).map((m) => m[0])).toEqual([0xf8, 0xfa, 0xfc, 0xf8]); // passed on whole
    for (const m of received) expect(malformation(m), JSON.stringify(m)).toBeUndefined();
    bridge.stop('test over');
  });

  it('an unterminated sysex does not hold the notes after it, and is counted', async () => {
    const { keyboard, synth, noteOns, bridge, tally } = await stage();
    keyboard.send([0xf0, 0x7d, 1, 2, 3]);
    keyboard.send([0x90, 64, 90]);
    expect(noteOns()).toBe(1);
    keyboard.send([0x80, 64, 0]);
    expect(synth.active()).toEqual([]);
    expect(bridge.inputDrops).toEqual({ bytes: 5, sysex: 1, sysexTimedOut: 0 });
    expect(tally.malformedBytes + bridge.inputDrops.bytes).toBe(5); // what the display shows as garbled input bytes
    bridge.stop('test over');
  });

  it('a sysex unfinished after the time limit is dropped by the timer', async () => {
    const { keyboard, bridge } = await stage();
    keyboard.send([0xf0, 0x7d, 1]);
    await wait(LIVE_SYSEX_TIME_LIMIT_MS + 100);
    expect(bridge.inputDrops.sysexTimedOut).toBe(1);
    bridge.stop('test over');
  });

  it('across unplug and replug: a sysex cut by the unplug is dropped, the notes held are released, the input works again', async () => {
    const { keyboard, pedals, synth, noteOns, bridge } = await stage();
    keyboard.send([0x90, 60, 90, 64, 90]);
    keyboard.send([0xf0, 0x7d, 1, 2]);
    pedals.send([0xb0, 80, 5]); // the other input is not affected
    keyboard.unplug();
    await until(() => bridge.inputsConnected[0] === false);
    expect(bridge.inputsConnected).toEqual([false, true]);
    expect(synth.active()).toEqual([]);
    keyboard.plug();
    await until(() => bridge.inputsConnected[0] === true);
    expect(bridge.inputsConnected).toEqual([true, true]);
    keyboard.send([3, 4, 0xf7]); // the rest of the old sysex: stray data now
    keyboard.send([0x90, 67, 90]);
    expect(noteOns()).toBe(3);
    keyboard.send([0x80, 67, 0]);
    expect(synth.active()).toEqual([]);
    expect(bridge.inputDrops.sysex).toBe(1);
    bridge.stop('test over');
  });
});

/** Random bytes as a device might send them: messages with and without running status, real-time bytes anywhere, sysex cut short, garbage. */
function randomStream(rng: Prng, chunks: number): number[][] {
  const out: number[][] = [];
  for (let c = 0; c < chunks; c++) {
    const bytes: number[] = [];
    const n = rng.int(1, 6);
    for (let i = 0; i < n; i++) {
      const r = rng.next();
      const channel = rng.int(0, 1);
      const key = rng.int(48, 72);
      if (r < 0.35) bytes.push(0x90 | channel, key, rng.int(1, 127));
      else if (r < 0.55) bytes.push(0x80 | channel, key, rng.int(0, 127));
      else if (r < 0.7) bytes.push(key, rng.chance(0.5) ? 0 : rng.int(1, 127)); // running status
      else if (r < 0.78) bytes.push(rng.pick([0xf8, 0xfa, 0xfb, 0xfc, 0xfe, 0xff]));
      else if (r < 0.84) bytes.push(0xf0, 0x7d, rng.int(0, 127));
      else if (r < 0.88) bytes.push(0xf7);
      else if (r < 0.94) bytes.push(0xb0 | channel, rng.pick([1, 7, 64, 66, 11]), rng.int(0, 127));
      else bytes.push(rng.int(0, 255));
    }
    // Cut the stream at any byte, as USB packets and serial reads do.
    for (let i = 0; i < bytes.length; ) {
      const len = rng.int(1, 5);
      out.push(bytes.slice(i, i + len));
      i += len;
    }
  }
  return out;
}

const noteOnsOf = (messages: ReadonlyArray<{ data: readonly number[] }>) => messages.filter((m) => (m.data[0]! & 0xf0) === 0x90 && m.data[2]! > 0).length;

describe('random byte streams through the live bridge against the same bytes straight into the engine', () => {
  for (const seed of [11, 12, 13]) {
    it(`seed ${seed}: no note-on lost below the engine, and nothing left sounding`, async () => {
      const rng = new Prng(seed);
      const { keyboard, synth, received, router, bridge, tally } = await stage();
      const { router: direct, tally: directTally } = createEngine({ tuning: meantone, reference: A440 });
      const directOut = [...direct.start(0)];
      const stream = randomStream(rng, 600);
      stream.forEach((chunk, i) => {
        keyboard.send(chunk);
        directOut.push(...direct.process(i, chunk, 0));
      });
      const live = received.map((data) => ({ data }));
      expect(noteOnsOf(live)).toBeGreaterThan(300); // the stream is not mostly garbage
      expect(noteOnsOf(live)).toBe(noteOnsOf(directOut));
      expect(router.soundingCount).toBe(direct.soundingCount);
      expect(tally.malformedBytes + bridge.inputDrops.bytes).toBe(directTally.malformedBytes);
      for (const m of received) expect(malformation(m), JSON.stringify(m)).toBeUndefined();
      // The player lets go of everything: every key up on both channels, the pedals up.
      keyboard.send([0xb0, 64, 0, 66, 0, 0xb1, 64, 0, 66, 0]);
      for (const channel of [0, 1]) keyboard.send([0x80 | channel, ...Array.from({ length: 128 }, (_, k) => [k, 0]).flat()]);
      expect(synth.active()).toEqual([]);
      bridge.stop('test over');
    });
  }
});
