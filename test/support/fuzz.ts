import { TICK_MS } from '../../src/live/bridge.js';
import type { TimedMessage } from '../../src/midi/bytes.js';
import { loadTuningPreset } from '../../src/presets/tuning-presets.js';
import { renderEvents } from '../../src/render/render-midi.js';
import type { MidiFileContent } from '../../src/render/smf.js';
import type { Router, RouterEvent } from '../../src/router/router.js';
import { createEngine, createRouter, type EngineOptionsInput } from '../../src/router/setup.js';
import { sourceOf } from '../../src/midi/note-id.js';
import { createStrategy } from '../../src/spelling/strategy.js';
import { parseReference } from '../../src/tuning/index.js';
import { InvariantChecker, type InvariantCounts } from './invariants.js';
import { Prng } from './prng.js';
import { ReferenceStream } from './reference-stream.js';

/**
 * Seeded fuzzing of the engine: random performances with everything a device or a file may send
 * (garbage bytes, running status, real-time bytes inside messages, unterminated system exclusive,
 * duplicate note-ons, stray note-offs, pedals, All Notes Off, All Sound Off, Reset All Controllers,
 * mode messages, RPN and NRPN including the keyboard's RPN 0, long gaps, unplugging), played
 * through the engine, `render` and (test/support/fuzz-live.ts) the live bridge, each checked by
 * the invariants of test/support/invariants.ts. The tests and bench/fuzz.ts share it.
 */

export interface FuzzSetup {
  readonly mode: 'bend' | 'mts-note' | 'mts-octave' | 'pass';
  /** For `bend`. */
  readonly layout: 'mpe' | 'multi';
  readonly strategy: 'fixed' | 'follow';
  /** A tuning id for every run of this setup; otherwise one is drawn from the run's random seed. */
  readonly tuning?: string;
}

/** Every output mode and layout, with fixed and follow spelling. */
export const FUZZ_SETUPS: readonly FuzzSetup[] = (['fixed', 'follow'] as const).flatMap((strategy): FuzzSetup[] => [
  { mode: 'bend', layout: 'mpe', strategy },
  { mode: 'bend', layout: 'multi', strategy },
  { mode: 'mts-note', layout: 'mpe', strategy },
  { mode: 'mts-octave', layout: 'mpe', strategy },
  { mode: 'pass', layout: 'mpe', strategy },
]).concat(
  // Adaptive just intonation: every note its own pitch, and no sounding note may move.
  (['fixed', 'follow'] as const).flatMap((strategy): FuzzSetup[] => [
    { mode: 'bend', layout: 'mpe', strategy, tuning: 'just-adaptive' },
    { mode: 'mts-note', layout: 'mpe', strategy, tuning: 'just-adaptive' },
  ]),
);

export const describeSetup = (s: FuzzSetup): string => `${s.mode}${s.mode === 'bend' ? ` ${s.layout}` : ''}, ${s.strategy} spelling${s.tuning ? `, ${s.tuning}` : ''}`;

export interface FuzzFlags {
  /**
   * Also generate the cases of the defects known from issue 11, which the engine does not handle
   * yet. Off, the generator leaves out: in `bend` (either layout) Reset All Controllers (item 3:
   * forwarded, it centres every member's tuning bend until they are sent again); in `mts-note`
   * sustain and sostenuto pedal downs (item 4: a steal may take a slot a pedal still holds) and
   * note-ons on keys 0 and 1 (item 7: below MTS's lowest frequency, clamped silently); and live,
   * unplugging while a pedal is down (item 1: the device lifts its pedals first).
   */
  readonly knownDefects: boolean;
  /**
   * Also generate the cases of defects this fuzz found that issue 11 does not list. Off, the
   * generator sends no active sensing (FE): after an active-sensing panic the outputs forget their
   * release guard, so a note within the release time retunes a channel or slot whose release
   * tails still ring (test/fuzz/known-defects.test.ts).
   */
  readonly foundDefects: boolean;
}

/** One step of a performance: bytes from a source (a device) at a time, or a device unplugged or plugged back. */
export type FuzzStep =
  | { readonly time: number; readonly source: number; readonly bytes: number[] }
  | { readonly time: number; readonly source: number; readonly hotplug: 'unplug' | 'plug' };

/** Messages the engine does not handle yet (issue 11), for a setup, when the flags leave them out. */
function knownDefect(m: readonly number[], setup: FuzzSetup): boolean {
  const status = m[0]!;
  if (status >= 0xf0) return false;
  const kind = status & 0xf0;
  if (setup.mode === 'bend' && kind === 0xb0 && m[1] === 121) return true; // item 3
  if (setup.mode === 'mts-note') {
    if (kind === 0xb0 && (m[1] === 64 || m[1] === 66) && m[2]! >= 64) return true; // item 4
    if (kind === 0x90 && m[2]! > 0 && m[1]! < 2) return true; // item 7
  }
  return false;
}

const REAL_TIME = [0xf8, 0xfa, 0xfb, 0xfc, 0xfe, 0xff];
const REAL_TIME_NO_SENSING = [0xf8, 0xfa, 0xfb, 0xfc, 0xff];

/**
 * A random performance of `events` events from `sources` devices (source 1 is a pedal box), with
 * unplugging when `hotplug` is set. Every event is checked against the flags by an independent
 * reading of the stream (a candidate that would hit a known defect is drawn again).
 */
export function generatePerformance(options: { seed: number; events: number; setup: FuzzSetup; flags: FuzzFlags; sources: number; hotplug: boolean }): FuzzStep[] {
  const { setup, flags, sources } = options;
  const rng = new Prng(options.seed);
  const streams = Array.from({ length: sources }, () => new ReferenceStream());
  const held = Array.from({ length: sources }, () => new Map<number, number>()); // channel·128 + key → channel
  const unplugged = new Set<number>();
  const plugAt = new Map<number, number>();
  const steps: FuzzStep[] = [];
  let time = 0;
  const realTime = flags.foundDefects ? REAL_TIME : REAL_TIME_NO_SENSING;
  const anyByte = (): number => {
    const b = rng.int(0, 255);
    return b === 0xfe && !flags.foundDefects ? 0xf8 : b;
  };

  const channelMessage = (source: number, status: number, data: number[]): number[] => {
    // Running status when the stream allows it, now and then.
    const bytes = streams[source]!.runningStatus === status && rng.chance(0.4) ? [...data] : [status, ...data];
    if (rng.chance(0.08)) bytes.splice(rng.int(1, bytes.length), 0, rng.pick(realTime)); // a real-time byte inside
    return bytes;
  };

  const candidate = (source: number): number[] => {
    const r = rng.next();
    const channel = rng.chance(0.85) ? 0 : rng.int(0, 15);
    const heldHere = held[source]!;
    const key = rng.chance(0.95) ? rng.int(21, 108) : rng.int(0, 127);
    if (r < 0.3) return channelMessage(source, 0x90 | channel, [key, rng.int(1, 127)]);
    if (r < 0.5) {
      const keys = [...heldHere.keys()];
      if (keys.length === 0) return [];
      const id = rng.pick(keys);
      return rng.chance(0.5) ? channelMessage(source, 0x80 | (id >> 7), [id & 127, rng.int(0, 127)]) : channelMessage(source, 0x90 | (id >> 7), [id & 127, 0]);
    }
    if (r < 0.53) return channelMessage(source, 0x80 | channel, [key, 64]); // a stray note-off (or not: whatever is held)
    if (r < 0.56) {
      const keys = [...heldHere.keys()];
      if (keys.length === 0) return [];
      const id = rng.pick(keys);
      return channelMessage(source, 0x90 | (id >> 7), [id & 127, rng.int(1, 127)]); // a duplicate note-on
    }
    if (r < 0.64) return channelMessage(source, 0xb0 | channel, [64, rng.pick([0, 127, rng.int(0, 127)])]);
    if (r < 0.68) return channelMessage(source, 0xb0 | channel, [66, rng.pick([0, 127, rng.int(0, 127)])]);
    if (r < 0.72) {
      const v = rng.chance(0.2) ? 8192 : rng.int(0, 16383);
      return channelMessage(source, 0xe0 | channel, [v & 127, v >> 7]);
    }
    if (r < 0.735) return channelMessage(source, 0xb0 | channel, [123, 0]); // All Notes Off
    if (r < 0.745) return channelMessage(source, 0xb0 | channel, [120, 0]); // All Sound Off
    if (r < 0.755) return channelMessage(source, 0xb0 | channel, [121, 0]); // Reset All Controllers
    if (r < 0.765) return channelMessage(source, 0xb0 | channel, [rng.int(122, 127), rng.pick([0, 1, 127])]); // local control, mode messages
    if (r < 0.78) {
      // The keyboard's RPN 0 (its wheel range), then the null RPN.
      const bytes = [0xb0 | channel, 101, 0, 100, 0, 6, rng.int(0, 24)];
      if (rng.chance(0.5)) bytes.push(38, rng.int(0, 99));
      if (rng.chance(0.7)) bytes.push(101, 127, 100, 127);
      return bytes;
    }
    if (r < 0.79) return [0xb0 | channel, 101, 0, 100, rng.int(1, 6), 6, rng.int(0, 127), rng.pick([96, 97]), 0]; // other RPNs, data increment/decrement
    if (r < 0.805) return [0xb0 | channel, 99, rng.int(0, 127), 98, rng.int(0, 127), 6, rng.int(0, 127), 38, rng.int(0, 127)]; // NRPN
    if (r < 0.83) return channelMessage(source, rng.pick([0xa0, 0xb0, 0xc0, 0xd0]) | channel, [rng.int(0, 119), rng.int(0, 127)]).slice(0, 3);
    if (r < 0.84) return [0xf0, 0x7d, ...Array.from({ length: rng.int(0, 20) }, () => rng.int(0, 127)), 0xf7];
    if (r < 0.85) return [0xf0, 0x7d, ...Array.from({ length: rng.int(0, 8) }, () => rng.int(0, 127))]; // never finished
    if (r < 0.87) return Array.from({ length: rng.int(1, 6) }, anyByte); // garbage
    if (r < 0.88) return [rng.pick(realTime)];
    if (r < 0.9) return [0xf2, rng.int(0, 127), rng.int(0, 127), 0xf6, 0xf1, rng.int(0, 127)].slice(0, rng.int(1, 6)); // system common, maybe cut
    // Otherwise release something: performances keep moving.
    const keys = [...heldHere.keys()];
    if (keys.length === 0) return [];
    const id = rng.pick(keys);
    return channelMessage(source, 0x80 | (id >> 7), [id & 127, 0]);
  };

  for (let n = 0; n < options.events; n++) {
    time += rng.chance(0.003) ? rng.int(1000, 5000) : rng.chance(0.3) ? 0 : rng.int(1, 40);
    // A device comes back a few events after it was unplugged.
    const back = [...plugAt].find(([, at]) => at <= n);
    if (back) {
      plugAt.delete(back[0]);
      unplugged.delete(back[0]);
      steps.push({ time, source: back[0], hotplug: 'plug' });
      continue;
    }
    if (options.hotplug && rng.chance(0.004)) {
      const source = rng.int(0, sources - 1);
      if (!unplugged.has(source)) {
        // Known defect (item 1): the engine's pedals outlive the device; lift them before it goes.
        if (!flags.knownDefects) {
          const lift = [0xb0, 64, 0, 66, 0];
          streams[source]!.feed(lift);
          steps.push({ time, source, bytes: lift });
        }
        unplugged.add(source);
        plugAt.set(source, n + rng.int(3, 60));
        streams[source]!.cut();
        held[source]!.clear();
        steps.push({ time, source, hotplug: 'unplug' });
        continue;
      }
    }
    const source = sources > 1 && rng.chance(0.15) ? 1 : 0;
    if (unplugged.has(source)) continue;
    let bytes: number[] = [];
    let messages: number[][] = [];
    for (let attempt = 0; attempt < 20; attempt++) {
      const trial = candidate(source);
      const stream = streams[source]!.clone();
      const parsed = stream.feed(trial);
      if (!flags.knownDefects && parsed.some((m) => knownDefect(m, setup))) continue;
      bytes = trial;
      messages = parsed;
      streams[source] = stream;
      break;
    }
    if (bytes.length === 0) continue;
    for (const m of messages) {
      const kind = m[0]! & 0xf0;
      if (m[0]! >= 0xf0) continue;
      const id = ((m[0]! & 15) << 7) | m[1]!;
      if (kind === 0x90 && m[2]! > 0) held[source]!.set(id, m[0]! & 15);
      else if (kind === 0x80 || kind === 0x90) held[source]!.delete(id);
    }
    // Cut into packets anywhere, as USB packets and serial reads do.
    for (let i = 0; i < bytes.length; ) {
      const length = rng.chance(0.7) ? bytes.length : rng.int(1, 3);
      steps.push({ time, source, bytes: bytes.slice(i, i + length) });
      i += length;
    }
  }
  for (const source of unplugged) steps.push({ time, source, hotplug: 'plug' });
  return steps;
}

/** The player lets go of everything on one source: every key of every channel up, both pedals up. */
export function letGo(): number[] {
  const bytes: number[] = [];
  for (let c = 0; c < 16; c++) {
    bytes.push(0x80 | c);
    for (let k = 0; k < 128; k++) bytes.push(k, 0);
    bytes.push(0xb0 | c, 64, 0, 66, 0);
  }
  return bytes;
}

const TUNINGS = ['meantone-1-4', 'pythagorean', 'werckmeister-3', 'just-major', 'edo-31'];
const REFERENCES = ['A4=440', 'A4=415', 'C4=256'];

/** The engine options of a fuzz run: the setup's mode and layout, a tuning and reference chosen by its random seed, few channels so steals happen. */
export function fuzzEngine(setup: FuzzSetup, seed: number, observer?: (e: RouterEvent) => void, gather?: 'same-time'): EngineOptionsInput {
  const rng = new Prng(seed ^ 0x5eed);
  const few = rng.chance(0.5);
  return {
    tuning: loadTuningPreset(setup.tuning ?? rng.pick(TUNINGS)).tuning,
    reference: parseReference(rng.pick(REFERENCES)),
    mode: setup.mode,
    layout: setup.layout,
    channels: setup.mode !== 'bend' ? [0] : setup.layout === 'mpe' ? (few ? [1, 2, 3, 4] : undefined) : few ? [2, 3, 4, 5] : Array.from({ length: 16 }, (_, i) => i),
    speller: createStrategy({ strategy: setup.strategy }),
    observer,
    gather,
  };
}

export interface FuzzReport {
  readonly setup: FuzzSetup;
  readonly path: 'engine' | 'render' | 'live';
  readonly events: number;
  readonly counts: InvariantCounts;
  /** The router's book of sounding notes against the synth's, at the end (engine and live). */
  readonly bookMismatch: number;
  readonly violations: readonly string[];
  readonly clean: boolean;
}

export const RELEASE_GUARD_MS = 400;

/** What the checker needs to hear of the engine's decisions: notes it could not place, and panics. */
export function observe(checker: InvariantChecker, e: RouterEvent): void {
  if (e.type === 'note') checker.noteStarted(sourceOf(e.id));
  else if (e.type === 'note-dropped') checker.noteDropped();
  else if (e.type === 'panic') checker.panicking();
}

/** Extra engine options, and something done between steps (a control fired, a piece changed): its messages go to the synth too. */
export interface FuzzExtras {
  readonly engine?: (options: EngineOptionsInput) => EngineOptionsInput;
  readonly between?: (router: Router, time: number, step: number) => readonly TimedMessage[];
}

/** Plays steps straight into the engine (`Router.process`, `tick`, and `releaseSource` for an unplug, as the bridge does). */
export function runEngineFuzz(setup: FuzzSetup, seed: number, steps: readonly FuzzStep[], sources: number, extras: FuzzExtras = {}): FuzzReport {
  const checker = new InvariantChecker({ mode: setup.mode, tailMs: RELEASE_GUARD_MS });
  const options = fuzzEngine(setup, seed, (e) => observe(checker, e));
  const router = createRouter(extras.engine ? extras.engine(options) : options);
  const feed = (out: readonly TimedMessage[]): void => {
    for (const m of out) checker.output(m.time, m.data);
  };
  const streams = Array.from({ length: sources }, () => new ReferenceStream());
  checker.input([]);
  feed(router.start(0));
  let time = 0;
  for (const [index, step] of steps.entries()) {
    if (extras.between) {
      checker.input([]);
      feed(extras.between(router, time, index));
    }
    // Time passes as under the bridge's timer: a tick every TICK_MS (the active-sensing timeout fires on one).
    for (let t = time + TICK_MS; t < step.time; t += TICK_MS) {
      checker.input([]);
      feed(router.tick(t));
    }
    time = step.time;
    checker.input([]);
    feed(router.tick(time));
    if ('hotplug' in step) {
      if (step.hotplug === 'unplug') {
        streams[step.source]!.cut();
        feed(router.releaseSource(time, step.source));
        checker.unplugged(step.source);
      }
      continue;
    }
    checker.input(streams[step.source]!.feed(step.bytes), step.source);
    feed(router.process(time, step.bytes, step.source));
  }
  for (let source = 0; source < sources; source++) {
    const bytes = letGo();
    checker.input(streams[source]!.feed(bytes), source);
    feed(router.process(time, bytes, source));
  }
  const counts = checker.finish(time);
  const bookMismatch = Math.abs(router.soundingCount - checker.synth.active().length);
  return { setup, path: 'engine', events: steps.length, counts, bookMismatch, violations: checker.violations, clean: checker.clean && bookMismatch === 0 };
}

/**
 * Plays one source's steps as a file through `render`'s loop (`renderEvents`: same-time chords,
 * the release of everything and the closing panic at the end). Each step is one file event: a
 * file carries garbage, real-time bytes and split sysex in escaped sysex packets (SMF 1.0 F7
 * events), which a reader passes on as raw bytes.
 */
export function runRenderFuzz(setup: FuzzSetup, seed: number, steps: readonly FuzzStep[]): FuzzReport {
  const checker = new InvariantChecker({ mode: setup.mode, tailMs: RELEASE_GUARD_MS });
  const engine = createEngine(fuzzEngine(setup, seed, (e) => observe(checker, e), 'same-time'));
  const events = steps.flatMap((s) => ('bytes' in s ? [{ tick: s.time, time: s.time, data: s.bytes }] : []));
  const lastTick = events[events.length - 1]?.tick ?? 0;
  const content: MidiFileContent = { division: { ticksPerBeat: 500 }, events, meta: [], lastTick, msPerTickAtEnd: 1 };
  const { messages } = renderEvents(content, engine);
  // The input each output tick answers: every event up to that tick not yet counted.
  const stream = new ReferenceStream();
  let next = 0;
  const inputUpTo = (tick: number): void => {
    const messagesIn: number[][] = [];
    while (next < events.length && events[next]!.tick <= tick) messagesIn.push(...stream.feed(events[next++]!.data));
    checker.input(messagesIn);
  };
  let lastOutTick = -1;
  for (const m of messages) {
    if (m.tick !== lastOutTick) {
      inputUpTo(m.tick);
      lastOutTick = m.tick;
    }
    checker.output(m.tick, m.data);
  }
  inputUpTo(Infinity);
  const counts = checker.finish(lastOutTick);
  return { setup, path: 'render', events: events.length, counts, bookMismatch: 0, violations: checker.violations, clean: checker.clean };
}
