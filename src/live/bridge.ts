import { performance } from 'node:perf_hooks';
import type { TimedMessage } from '../midi/bytes.js';
import type { Router } from '../router/router.js';
import { UserError } from '../util/errors.js';
import type { BridgeNotice } from '../io/port-notice.js';
import { closeWebmidiInput, describePorts, findInput, findOutput, matchPort, onPortChange, type Output, type PortChange } from '../io/midi-system.js';
import { openRawInput, rawInputNames, watchInputs, type RawInput } from '../io/raw-input.js';
import { addDrops, InputStream, NO_DROPS, type InputDrops } from '../midi/input-stream.js';
import type { Recorder } from './recorder.js';

/** How often time is let pass in the engine (active-sensing timeout, chord gathering), in ms. */
export const TICK_MS = 10;

export interface BridgeOptions {
  /** Input port queries (name substring or index); several inputs merge (keyboard + pedal device). */
  readonly inputs: readonly string[];
  readonly output: string;
  readonly router: Router;
  readonly recorder?: Recorder | undefined;
  /** Hears port changes and send failures, for the display. */
  readonly onNotice?: ((notice: BridgeNotice) => void) | undefined;
  readonly clock?: (() => number) | undefined;
}


interface InputSlot {
  readonly query: string;
  readonly source: number;
  /** The input's bytes into whole messages, with bounds on system exclusive. */
  readonly stream: InputStream;
  port: RawInput | undefined;
  /** The name of the port last opened for this slot (it comes back under the same name). */
  name: string | undefined;
}

/**
 * The live bridge: input ports into the engine, the engine's output to the synth port. It is the
 * imperative shell around `Router`: it adds the clock and the ports, keeps going when ports come
 * and go (an input that disappears has its notes released at once; an output that comes back gets
 * a panic and the start-up messages again), and `stop` always ends every note first.
 *
 * Input bytes are taken from jzz's own ports (src/io/raw-input.ts), below webmidi, and made into
 * whole messages by an `InputStream` per input (running status, real-time bytes inside messages,
 * system exclusive bounded in length and time); what it drops is counted (`inputDrops`) and added
 * to the engine's malformed-byte count that the display shows.
 */
export type { BridgeNotice } from '../io/port-notice.js';

export class Bridge {
  private readonly inputs: InputSlot[];
  private output: Output | undefined;
  private timer: NodeJS.Timeout | undefined;
  private stopPortWatch: (() => void) | undefined;
  private stopInputWatch: (() => void) | undefined;
  private stopped = false;
  /** Messages that could not be sent (output missing or failing). */
  lostMessages = 0;
  private readonly clock: () => number;

  private constructor(private readonly options: BridgeOptions) {
    this.clock = options.clock ?? (() => performance.now());
    this.inputs = options.inputs.map((query, source) => ({ query, source, stream: new InputStream(), port: undefined, name: undefined }));
  }

  /** Opens the ports (all must exist: a missing one is a one-line error listing what does), sends the set-up. */
  static open(options: BridgeOptions): Bridge {
    const bridge = new Bridge(options);
    for (const slot of bridge.inputs) {
      if (!findInput(slot.query)) throw new UserError(`no MIDI input matches "${slot.query}" (${describePorts('input')})`);
    }
    if (!findOutput(options.output)) throw new UserError(`no MIDI output matches "${options.output}" (${describePorts('output')})`);
    bridge.output = findOutput(options.output);
    for (const slot of bridge.inputs) bridge.attach(slot, findInput(slot.query)!.name);
    bridge.send(options.router.start(bridge.clock()));
    bridge.stopPortWatch = onPortChange((change) => bridge.portChanged(change));
    bridge.stopInputWatch = watchInputs((kind, name) => bridge.inputChanged(kind, name));
    bridge.timer = setInterval(() => bridge.tick(), TICK_MS);
    return bridge;
  }

  /** True when every port asked for is there now. */
  static portsPresent(inputs: readonly string[], output: string): boolean {
    return inputs.every((q) => findInput(q) !== undefined) && findOutput(output) !== undefined;
  }

  get outputConnected(): boolean {
    return this.output !== undefined;
  }

  get inputsConnected(): boolean[] {
    return this.inputs.map((s) => s.port !== undefined);
  }

  /** Each port asked for, by its name (the player's words until it has been found), and whether it is there. */
  portStates(): { inputs: Array<{ name: string; connected: boolean }>; output: { name: string; connected: boolean } } {
    return {
      inputs: this.inputs.map((s) => ({ name: s.port?.name ?? s.query, connected: s.port !== undefined })),
      output: { name: this.output?.name ?? this.options.output, connected: this.output !== undefined },
    };
  }

  /** What the inputs have dropped so far (malformed bytes, incomplete system exclusive). */
  get inputDrops(): InputDrops {
    return this.inputs.reduce((sum, slot) => addDrops(sum, slot.stream.drops), NO_DROPS);
  }

  private tick(): void {
    const now = this.clock();
    for (const slot of this.inputs) slot.stream.expire(now);
    this.send(this.options.router.tick(now));
  }


  private attach(slot: InputSlot, name: string): void {
    slot.name = name;
    slot.port = openRawInput(
      name,
      (bytes) => this.received(slot, bytes),
      () => {
        if (slot.port?.name === name) slot.port = undefined;
      },
    );
    closeWebmidiInput(name);
  }

  private received(slot: InputSlot, bytes: readonly number[]): void {
    if (this.stopped) return;
    const now = this.clock();
    slot.stream.feed(now, bytes, (message) => {
      this.options.recorder?.received(now, message);
      this.send(this.options.router.process(now, message, slot.source));
    });
  }

  private detach(slot: InputSlot): void {
    slot.port?.close();
    slot.port = undefined;
  }

  /** An input appeared or disappeared (jzz's watcher, which webmidi's layer also follows). */
  private inputChanged(kind: 'connected' | 'disconnected', name: string): void {
    if (this.stopped) return;
    const now = this.clock();
    const notice = (action: string): void => this.options.onNotice?.({ kind: 'port', change: { kind, type: 'input', name }, action });
    for (const slot of this.inputs) {
      if (kind === 'disconnected' && slot.port?.name === name) {
        this.detach(slot);
        slot.stream.reset(); // a message cut off by the unplug is dropped
        this.send(this.options.router.releaseSource(now, slot.source));
        notice('its notes were released');
      } else if (kind === 'connected' && !slot.port && (slot.name === name || matchPort(rawInputNames().map((n) => ({ name: n })), slot.query)?.name === name)) {
        this.attach(slot, name);
        notice('reopened');
      }
    }
  }

  private portChanged(change: PortChange): void {
    if (this.stopped) return;
    const now = this.clock();
    const notice = (action: string): void => this.options.onNotice?.({ kind: 'port', change, action });
    if (change.type === 'input') {
      // Inputs are followed through jzz (inputChanged); webmidi reopens its own handle on an input
      // that comes back, which is closed again here.
      if (change.kind === 'connected' && this.inputs.some((slot) => slot.name === change.name)) closeWebmidiInput(change.name);
      return;
    }
    if (change.kind === 'disconnected' && this.output && this.output.name === change.name) {
      this.output = undefined;
      this.options.router.panic(now, 'output lost'); // the synth is gone: forget what it held
      notice('notes forgotten; waiting for it to come back');
    } else if (change.kind === 'connected' && !this.output && findOutput(this.options.output)?.name === change.name) {
      this.output = findOutput(this.options.output);
      this.send(this.options.router.panic(now, 'output back'));
      this.send(this.options.router.start(now));
      notice('set up again');
    }
  }

  send(messages: readonly TimedMessage[]): void {
    for (const m of messages) {
      this.options.recorder?.sent(m.time, m.data);
      if (!this.output) {
        this.lostMessages++;
        continue;
      }
      try {
        this.output.send(m.data as number[]);
      } catch (error) {
        this.lostMessages++;
        this.options.onNotice?.({ kind: 'send-failed', error: error instanceof Error ? error.message : String(error) });
      }
    }
  }

  /** A panic from the player (a key on the terminal, or a bound control). */
  panic(reason = 'panic'): void {
    this.send(this.options.router.panic(this.clock(), reason));
  }

  /** Ends every note and lets go of the ports. Safe to call more than once. */
  stop(reason: string): void {
    if (this.stopped) return;
    this.send(this.options.router.panic(this.clock(), reason));
    this.stopped = true;
    if (this.timer) clearInterval(this.timer);
    this.stopPortWatch?.();
    this.stopInputWatch?.();
    for (const slot of this.inputs) this.detach(slot);
  }
}
