import JZZ from 'jzz';

/**
 * In-process virtual ports, registered with jzz before MIDI is enabled; webmidi then lists them as
 * real ports. For the demo, the tests and benchmarks, where there is no MIDI hardware.
 */
export interface VirtualInput {
  readonly name: string;
  /** Sends bytes from the virtual device into the system, as a keyboard would (any bytes: running status, real-time bytes inside messages, half a sysex). */
  send(bytes: readonly number[]): void;
  /** Unplugs it (hot-plug): it sends nothing until `plug` puts it back. */
  unplug(): void;
  plug(): void;
}

export interface VirtualOutput {
  readonly name: string;
  unplug(): void;
  plug(): void;
}

interface Widget {
  _emit(message: number[]): void;
}

/** The part of jzz's API for virtual ports (its bundled typings leave it out). */
const registry = JZZ as unknown as {
  Widget(handlers?: { _receive(message: ArrayLike<number>): void }): Widget;
  addMidiIn(name: string, widget: Widget): unknown;
  addMidiOut(name: string, widget: Widget): unknown;
  maskMidiIn(name: string): void;
  unmaskMidiIn(name: string): void;
  maskMidiOut(name: string): void;
  unmaskMidiOut(name: string): void;
};

/** jzz looks at its port lists again (and tells its watchers what changed). */
const refresh = (): void => void (JZZ as unknown as () => { refresh(): unknown })().refresh();

/**
 * Splits bytes into the packets a jzz widget accepts: jzz's message type refuses an array whose
 * second byte is not a key number after a note or poly-pressure status (a real-time byte there,
 * say), so such a byte starts a new packet. The receiver sees the same byte stream.
 */
export function packetsForJzz(bytes: readonly number[]): number[][] {
  const packets: number[][] = [];
  let current: number[] = [];
  for (const b of bytes) {
    const first = current[0];
    if (current.length === 1 && first !== undefined && first >= 0x80 && first <= 0xaf && !(Number.isInteger(b) && b >= 0 && b < 0x80)) {
      packets.push(current);
      current = [];
    }
    current.push(b);
  }
  if (current.length > 0) packets.push(current);
  return packets;
}

/*
 * Unplugging hides a port from jzz's lists (mask) rather than removing it: jzz 1.9.6 removes
 * `i + 1` entries from its list of virtual ports when removing the one at index i
 * (`splice(i, i + 1)`), so removing one port could take others with it.
 */
export function virtualInput(name: string): VirtualInput {
  const widget = registry.Widget();
  let plugged = true;
  registry.addMidiIn(name, widget);
  return {
    name,
    send: (bytes) => {
      if (!plugged) return; // a device that is unplugged sends nothing
      for (const packet of packetsForJzz(bytes)) widget._emit(packet);
    },
    unplug: () => {
      plugged = false;
      registry.maskMidiIn(name);
      refresh();
    },
    plug: () => {
      plugged = true;
      registry.unmaskMidiIn(name);
      refresh();
    },
  };
}

/** A virtual output whose receiver gets every message a program sends to it. */
export function virtualOutput(name: string, receive: (bytes: number[]) => void): VirtualOutput {
  let plugged = true;
  const widget = registry.Widget({ _receive: (message) => plugged && receive(Array.from(message)) });
  registry.addMidiOut(name, widget);
  return {
    name,
    unplug: () => {
      plugged = false;
      registry.maskMidiOut(name);
      refresh();
    },
    plug: () => {
      plugged = true;
      registry.unmaskMidiOut(name);
      refresh();
    },
  };
}
