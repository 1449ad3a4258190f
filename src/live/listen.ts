import { performance } from 'node:perf_hooks';
import { closeWebmidiInput, describePorts, findInput, listPorts } from '../io/midi-system.js';
import { openRawInput, type RawInput } from '../io/raw-input.js';
import { InputStream } from '../midi/input-stream.js';
import { decodeMessage, type MidiMessage } from '../midi/message.js';
import { UserError } from '../util/errors.js';

/** Inputs being listened to (not played through): `ports --watch` and `--learn`. */
export interface Listening {
  /** The names of the inputs heard. */
  readonly names: readonly string[];
  stop(): void;
}

const TICK_MS = 50;

/**
 * Listens to the inputs matching `queries` (every input when there are none): each whole message
 * (read below webmidi and parsed by diesis, as the live bridge reads it) goes to `onMessage` with
 * the input's name and the time; `onTick` hears the time pass. MIDI must be enabled.
 */
export function listenToInputs(queries: readonly string[], onMessage: (input: string, time: number, message: MidiMessage) => void, onTick: (time: number) => void): Listening {
  const names = queries.length === 0 ? listPorts().inputs.map((p) => p.name) : queries.map((q) => findInput(q)?.name ?? missing(q));
  if (names.length === 0) throw new UserError(`nothing to listen to: ${describePorts('input')}`);
  const ports: RawInput[] = [];
  for (const name of [...new Set(names)]) {
    const stream = new InputStream();
    ports.push(openRawInput(name, (bytes) => {
      const now = performance.now();
      stream.feed(now, bytes, (data) => onMessage(name, now, decodeMessage(data)));
    }));
    closeWebmidiInput(name);
  }
  const timer = setInterval(() => onTick(performance.now()), TICK_MS);
  return {
    names: [...new Set(names)],
    stop: () => {
      clearInterval(timer);
      for (const p of ports) p.close();
    },
  };
}

function missing(query: string): never {
  throw new UserError(`no MIDI input matches "${query}" (${describePorts('input')})`);
}
