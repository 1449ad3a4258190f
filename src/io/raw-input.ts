import JZZ from 'jzz';

/**
 * Input bytes at the lowest level the port library offers. webmidi (on jzz's Web MIDI layer) hands
 * over only what that layer's splitter makes of the stream: it drops running-status messages and
 * a message with a real-time byte inside it, and an F0 without its F7 holds every later byte in a
 * queue that grows (and is searched again) with each message. So diesis opens jzz's own input port
 * and takes each packet as the device delivered it, to be parsed by diesis's stream parser
 * (src/midi/input-stream.ts); webmidi still lists the ports, and jzz's watcher (the one its Web
 * MIDI layer uses) says when an input comes and goes.
 */

/** The part of jzz's API used here (its bundled typings leave `this` and the packet type open). */
interface JzzPort {
  connect(handler: (packet: ArrayLike<number>) => void): JzzPort;
  disconnect(handler?: (packet: ArrayLike<number>) => void): JzzPort;
  close(): unknown;
  or(onError: () => void): JzzPort;
}

interface JzzDiff {
  readonly inputs: { readonly added: ReadonlyArray<{ readonly name: string }>; readonly removed: ReadonlyArray<{ readonly name: string }> };
}

interface JzzWatcher {
  disconnect(handler: (diff: JzzDiff) => void): unknown;
}

interface JzzEngine {
  openMidiIn(name: string): JzzPort;
  onChange(handler: (diff: JzzDiff) => void): JzzWatcher;
  info(): { inputs: Array<{ name: string }> };
}

const jzz = (): JzzEngine => (JZZ as unknown as () => JzzEngine)();

/** An open input: every packet goes to the callback until `close`. */
export interface RawInput {
  readonly name: string;
  close(): void;
}

/**
 * Opens the input named `name` (exactly) for raw packets. `onFailure` hears that it could not be
 * opened (it went away in the meantime).
 */
export function openRawInput(name: string, onPacket: (bytes: number[]) => void, onFailure?: () => void): RawInput {
  let open = true;
  const handler = (packet: ArrayLike<number>): void => {
    if (open) onPacket(Array.from(packet));
  };
  const port = jzz().openMidiIn(name);
  port.or(() => {
    open = false;
    onFailure?.();
  });
  port.connect(handler);
  return {
    name,
    close: () => {
      if (!open) return;
      open = false;
      port.disconnect(handler);
      port.close();
    },
  };
}

/** Names of the inputs jzz sees now. */
export function rawInputNames(): string[] {
  return jzz()
    .info()
    .inputs.map((p) => p.name);
}

/** Calls back with each input that appears or disappears; returns a function that stops listening. */
export function watchInputs(callback: (kind: 'connected' | 'disconnected', name: string) => void): () => void {
  const handler = (diff: JzzDiff): void => {
    for (const p of diff.inputs.removed) callback('disconnected', p.name);
    for (const p of diff.inputs.added) callback('connected', p.name);
  };
  const watcher = jzz().onChange(handler);
  return () => void watcher.disconnect(handler);
}
