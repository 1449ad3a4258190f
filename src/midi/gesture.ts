import { controllerText, keyName } from './heard.js';
import type { MidiMessage } from './message.js';

/**
 * What a pedal, key or button did, once it has finished doing it: the unit `ports --learn` binds
 * and `ports --watch` sums up. Channels are 0…15.
 */
export type Gesture =
  /** A controller that sent one or two values: a switch pedal or button. `released` is undefined when it was held. */
  | { readonly kind: 'switch'; readonly channel: number; readonly controller: number; readonly pressed: number; readonly released: number | undefined }
  /** A controller that swept through several values: an expression pedal, a wheel, a half-pedalling sustain. */
  | { readonly kind: 'continuous'; readonly channel: number; readonly controller: number; readonly low: number; readonly high: number; readonly first: number }
  | { readonly kind: 'key'; readonly channel: number; readonly key: number }
  | { readonly kind: 'program'; readonly channel: number; readonly program: number };

/** A controller is done when it has been still this long (ms): long enough for a press and its release. */
export const GESTURE_QUIET_MS = 600;

interface Moving {
  readonly channel: number;
  readonly controller: number;
  readonly values: number[];
  last: number;
}

/**
 * Gathers messages into gestures. Keys and program changes are gestures at once; a controller's
 * values are gathered until it has been still for `quietMs`, then judged by how many different
 * values it sent (one or two: a switch, with the first value as "pressed"; more: continuous).
 * Pure and timestamp-driven: the shell calls `hear` with each message and `tick` from a timer.
 */
export class GestureTracker {
  private readonly moving = new Map<number, Moving>();

  constructor(private readonly quietMs: number = GESTURE_QUIET_MS) {}

  /** A message at `time` (ms); returns the gestures it completes. */
  hear(time: number, m: MidiMessage): Gesture[] {
    const done = this.tick(time);
    if (m.kind === 'note-on') done.push({ kind: 'key', channel: m.channel, key: m.key });
    else if (m.kind === 'program') done.push({ kind: 'program', channel: m.channel, program: m.program });
    else if (m.kind === 'control') {
      const id = m.channel * 128 + m.controller;
      const state = this.moving.get(id) ?? { channel: m.channel, controller: m.controller, values: [], last: time };
      state.values.push(m.value);
      state.last = time;
      this.moving.set(id, state);
    }
    return done;
  }

  /** Time passes: returns the controllers that have been still long enough, as gestures. */
  tick(time: number): Gesture[] {
    const done: Gesture[] = [];
    for (const [id, state] of this.moving) {
      if (time - state.last < this.quietMs) continue;
      this.moving.delete(id);
      done.push(judge(state));
    }
    return done;
  }
}

function judge({ channel, controller, values }: Moving): Gesture {
  const distinct = [...new Set(values)];
  const first = values[0]!;
  if (distinct.length <= 2) return { kind: 'switch', channel, controller, pressed: first, released: distinct.find((v) => v !== first) };
  return { kind: 'continuous', channel, controller, low: Math.min(...values), high: Math.max(...values), first };
}

/** A gesture in a player's words: "controller 64 (sustain pedal) on channel 1: 127 when pressed, 0 when let go (a switch pedal)". */
export function describeGesture(g: Gesture): string {
  const on = `on channel ${g.channel + 1}`;
  switch (g.kind) {
    case 'key':
      return `key ${g.key} (${keyName(g.key)}) ${on} (a key, or a key switch)`;
    case 'program':
      return `program change ${g.program} ${on} (a button that sends programs)`;
    case 'switch':
      return `${controllerText(g.controller)} ${on}: ${g.pressed} when pressed${g.released === undefined ? ', still held' : `, ${g.released} when let go`} (a switch pedal${switchIsInverted(g) ? ' that sends less when pressed' : ''})`;
    case 'continuous':
      return `${controllerText(g.controller)} ${on}: ${g.low} to ${g.high} (a continuous pedal or wheel)`;
  }
}

/** A switch whose pressed value is the lower one (some pedals are wired that way round). */
export function switchIsInverted(g: Extract<Gesture, { kind: 'switch' }>): boolean {
  return g.released === undefined ? g.pressed < 64 : g.pressed < g.released;
}
