import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { readWithIndependentParser } from '../support/smf-reader.js';
import { disableMidi } from '../../src/io/midi-system.js';
import { virtualInput, virtualOutput } from '../../src/io/virtual-ports.js';
import { startSession, type Session } from '../../src/live/session.js';
import { keyOf, parseSpelledPitch } from '../../src/pitch/index.js';
import { loadTuningPreset } from '../../src/presets/tuning-presets.js';
import { ControlMap } from '../../src/spelling/control-map.js';
import { ControlledSpeller } from '../../src/spelling/controlled.js';
import { createStrategy } from '../../src/spelling/strategy.js';
import { SynthModel } from '../../src/synth/reference-synth.js';
import { A440, frequency } from '../../src/tuning/index.js';
import { tempDir } from '../support/temp.js';

const meantone = loadTuningPreset('meantone-1-4').tuning;
const wait = (ms: number) => new Promise((r) => setTimeout(r, ms));
/** Waits until `condition` holds (ports come and go when jzz next looks), failing after `ms`. */
async function until(condition: () => boolean, ms = 5000): Promise<void> {
  const end = Date.now() + ms;
  while (!condition()) {
    if (Date.now() > end) throw new Error('timed out waiting');
    await wait(10);
  }
}
const quietIo = { stdout: { write: () => undefined }, stderr: { write: () => undefined } };

let counter = 0;
/** Virtual keyboard, pedal box and synth (the reference synth), and a session between them, all through webmidi. */
async function stage(options: { flipCc?: number; multi?: boolean; recordFile?: string; logFile?: string } = {}) {
  const id = ++counter;
  const keyboard = virtualInput(`test keyboard ${id}`);
  const pedals = virtualInput(`test pedals ${id}`);
  const synth = new SynthModel(440, 400);
  const received: number[][] = [];
  const onset: Array<{ key: number; channel: number; hz: number }> = [];
  const synthPort = virtualOutput(`test synth ${id}`, (bytes) => {
    received.push(bytes);
    const v = synth.receive(performance.now(), bytes);
    if (v) onset.push({ key: v.key, channel: v.channel, hz: synth.frequency(v) });
  });
  const speller = new ControlledSpeller(createStrategy({ strategy: 'fixed' }));
  const controls = options.flipCc ? new ControlMap([{ trigger: { kind: 'cc', controller: options.flipCc, channel: undefined, threshold: 64 }, action: { name: 'flip' }, latch: false }], speller) : undefined;
  const session: Session = await startSession(
    {
      inputs: [keyboard.name, pedals.name],
      output: synthPort.name,
      engine: { tuning: meantone, reference: A440, controls, ...(options.multi ? { layout: 'multi', bendRange: 2 } : {}) },
      speller,
      strategy: 'fixed',
      title: 'test',
      quiet: true,
      virtualOnly: true,
      wait: true, // ports registered after MIDI started appear when jzz next looks
      recordFile: options.recordFile,
      logFile: options.logFile,
    },
    quietIo,
  );
  return { keyboard, pedals, synth, synthPort, received, onset, session };
}

describe('the take and the log', () => {
  it('records input and output tracks as a Standard MIDI File and logs every decision', async () => {
    const dir = tempDir('diesis-live-');
    const recordFile = join(dir, 'take.mid');
    const logFile = join(dir, 'take.jsonl');
    const { keyboard, session } = await stage({ recordFile, logFile });
    keyboard.send([0x90, 68, 90]);
    await wait(20);
    keyboard.send([0x80, 68, 0]);
    await wait(20);
    session.stop('test over');
    await wait(50);
    const take = readWithIndependentParser(readFileSync(recordFile));
    expect(take.tracks).toBe(3);
    const noteOns = take.messages.filter((m) => (m.data[0]! & 0xf0) === 0x90 && m.data[2]! > 0);
    expect(noteOns.map((m) => m.data[0])).toEqual([0x90, 0x91]); // as played on channel 1, as sent on channel 2
    const log = readFileSync(logFile, 'utf8').trim().split('\n').map((l) => JSON.parse(l) as { type: string; spelling?: string });
    expect(log.find((e) => e.type === 'note')?.spelling).toBe('G#4');
    expect(log[log.length - 1]?.type).toBe('panic');
  });
});

afterAll(async () => {
  await disableMidi();
});

const hz = (name: string) => frequency(meantone, A440, parseSpelledPitch(name));
const cents = (a: number, b: number) => Math.abs(1200 * Math.log2(a / b));

describe('the live bridge through webmidi and in-process virtual ports', () => {
  it('plays a scripted performance into the synth in tune, and leaves nothing hanging', async () => {
    const { keyboard, pedals, synth, onset, session } = await stage({ flipCc: 80 });
    await wait(50);
    expect(synth.zone?.master).toBe(0); // the MPE set-up arrived
    const chord = ['D3', 'F#4', 'A4', 'C5'].map((n) => keyOf(parseSpelledPitch(n)));
    for (const k of chord) keyboard.send([0x90, k, 90]);
    keyboard.send([0xb0, 64, 127]);
    await wait(30);
    for (const k of chord) keyboard.send([0x80, k, 0]);
    pedals.send([0xb0, 80, 127]); // flip: G♯ becomes A♭
    keyboard.send([0x90, 68, 90]);
    await wait(30);
    pedals.send([0xb0, 80, 0]);
    keyboard.send([0x90, 61, 90]); // C♯, the window's own
    await wait(30);
    keyboard.send([0x80, 68, 0]);
    keyboard.send([0x80, 61, 0]);
    keyboard.send([0xb0, 64, 0]);
    await wait(50);
    const expected = [...chord.map((k) => hz(`${['D3', 'F#4', 'A4', 'C5'][chord.indexOf(k)]}`)), hz('Ab4'), hz('C#4')];
    expect(onset).toHaveLength(6);
    onset.forEach((o, i) => expect(cents(o.hz, expected[i]!), `note ${i}`).toBeLessThan(0.3));
    expect(synth.active()).toEqual([]);
    session.stop('test over');
  });

  it('releases the notes of an input that disappears mid-chord, and reopens it when it comes back', async () => {
    const { keyboard, synth, onset, session } = await stage();
    await wait(30);
    for (const k of [60, 64, 67]) keyboard.send([0x90, k, 90]);
    await wait(30);
    expect(synth.active()).toHaveLength(3);
    keyboard.unplug();
    await until(() => session.bridge.inputsConnected[0] === false);
    expect(synth.active()).toEqual([]);
    keyboard.plug();
    await until(() => session.bridge.inputsConnected[0] === true);
    keyboard.send([0x90, 68, 90]);
    await wait(30);
    expect(cents(onset[onset.length - 1]!.hz, hz('G#4'))).toBeLessThan(0.3);
    keyboard.send([0x80, 68, 0]);
    session.stop('test over');
    await wait(20);
    expect(synth.active()).toEqual([]);
  });

  it('sets a synth up again when its output comes back', async () => {
    const { keyboard, synthPort, received, synth, session } = await stage({ multi: true });
    await wait(30);
    const rangeMessages = () => received.filter((m) => m[1] === 6 && m[2] === 2).length; // RPN 0 data: ±2
    const before = rangeMessages();
    expect(before).toBe(15);
    keyboard.send([0x90, 60, 90]);
    await wait(30);
    synthPort.unplug();
    await until(() => !session.bridge.outputConnected);
    keyboard.send([0x80, 60, 0]); // lost: nobody to send to
    synthPort.plug();
    await until(() => session.bridge.outputConnected);
    await wait(30);
    expect(rangeMessages()).toBe(2 * before); // the start-up again
    expect(received.some((m) => (m[0]! & 0xf0) === 0xb0 && m[1] === 123)).toBe(true); // and a panic before it
    keyboard.send([0x90, 64, 90]);
    await wait(30);
    expect(synth.active().map((v) => v.key)).toContain(64);
    session.stop('test over');
    await wait(20);
    expect(synth.active().filter((v) => v.key === 64)).toEqual([]);
  });
});
