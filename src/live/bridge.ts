import { performance } from 'node:perf_hooks';
import type { TimedMessage } from '../midi/bytes.js';
import type { Router } from '../router/router.js';
import { UserError } from '../util/errors.js';
import { describePorts, findInput, findOutput, onPortChange, type Input, type Output, type PortChange } from '../io/midi-system.js';
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

export type BridgeNotice =
  | { readonly kind: 'port'; readonly change: PortChange; readonly action: string }
  | { readonly kind: 'send-failed'; readonly error: string };

interface InputSlot {
  readonly query: string;
  readonly source: number;
  port: Input | undefined;
  listener: ((e: { timestamp: number; message: { rawData: Uint8Array } }) => void) | undefined;
}

/**
 * The live bridge: input ports into the engine, the engine's output to the synth port. It is the
 * imperative shell around `Router`: it adds the clock and the ports, keeps going when ports come
 * and go (an input that disappears has its notes released at once; an output that comes back gets
 * a panic and the start-up messages again), and `stop` always ends every note first.
 */
export class Bridge {
  private readonly inputs: InputSlot[];
  private output: Output | undefined;
  private timer: NodeJS.Timeout | undefined;
  private stopPortWatch: (() => void) | undefined;
  private stopped = false;
  /** Messages that could not be sent (output missing or failing). */
  lostMessages = 0;
  private readonly clock: () => number;

  private constructor(private readonly options: BridgeOptions) {
    this.clock = options.clock ?? (() => performance.now());
    this.inputs = options.inputs.map((query, source) => ({ query, source, port: undefined, listener: undefined }));
  }

  /** Opens the ports (all must exist: a missing one is a one-line error listing what does), sends the set-up. */
  static open(options: BridgeOptions): Bridge {
    const bridge = new Bridge(options);
    for (const slot of bridge.inputs) {
      if (!findInput(slot.query)) throw new UserError(`no MIDI input matches "${slot.query}" (${describePorts('input')})`);
    }
    if (!findOutput(options.output)) throw new UserError(`no MIDI output matches "${options.output}" (${describePorts('output')})`);
    bridge.output = findOutput(options.output);
    for (const slot of bridge.inputs) bridge.attach(slot);
    bridge.send(options.router.start(bridge.clock()));
    bridge.stopPortWatch = onPortChange((change) => bridge.portChanged(change));
    bridge.timer = setInterval(() => bridge.send(options.router.tick(bridge.clock())), TICK_MS);
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

  private attach(slot: InputSlot): void {
    const port = findInput(slot.query);
    if (!port) return;
    const listener = (e: { timestamp: number; message: { rawData: Uint8Array } }): void => {
      if (this.stopped) return;
      const bytes = e.message.rawData;
      this.options.recorder?.received(e.timestamp, Array.from(bytes));
      this.send(this.options.router.process(e.timestamp, bytes, slot.source));
    };
    port.addListener('midimessage', listener as never);
    slot.port = port;
    slot.listener = listener;
  }

  private detach(slot: InputSlot): void {
    if (slot.port && slot.listener) slot.port.removeListener('midimessage', slot.listener as never);
    slot.port = undefined;
    slot.listener = undefined;
  }

  private portChanged(change: PortChange): void {
    if (this.stopped) return;
    const now = this.clock();
    const notice = (action: string): void => this.options.onNotice?.({ kind: 'port', change, action });
    if (change.type === 'input') {
      for (const slot of this.inputs) {
        if (change.kind === 'disconnected' && slot.port && slot.port.name === change.name) {
          this.detach(slot);
          this.send(this.options.router.releaseSource(now, slot.source));
          notice('its notes were released');
        } else if (change.kind === 'connected' && !slot.port && findInput(slot.query)?.name === change.name) {
          this.attach(slot);
          notice('reopened');
        }
      }
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
    for (const slot of this.inputs) this.detach(slot);
  }
}
