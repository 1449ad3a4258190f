import JZZ from 'jzz';

/**
 * In-process virtual ports, registered with jzz before MIDI is enabled; webmidi then lists them as
 * real ports. For the demo, the tests and benchmarks, where there is no MIDI hardware.
 */
export interface VirtualInput {
  readonly name: string;
  /** Sends bytes from the virtual device into the system, as a keyboard would. */
  send(bytes: readonly number[]): void;
  /** Unplugs it (hot-plug); `plug` puts it back. */
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
  removeMidiIn(name: string): unknown;
  removeMidiOut(name: string): unknown;
};

export function virtualInput(name: string): VirtualInput {
  const widget = registry.Widget();
  const plug = (): void => void registry.addMidiIn(name, widget);
  plug();
  return { name, send: (bytes) => widget._emit([...bytes]), unplug: () => void registry.removeMidiIn(name), plug };
}

/** A virtual output whose receiver gets every message a program sends to it. */
export function virtualOutput(name: string, receive: (bytes: number[]) => void): VirtualOutput {
  const widget = registry.Widget({ _receive: (message) => receive(Array.from(message)) });
  const plug = (): void => void registry.addMidiOut(name, widget);
  plug();
  return { name, unplug: () => void registry.removeMidiOut(name), plug };
}
