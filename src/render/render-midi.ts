import type { EngineOptions } from '../router/setup.js';
import type { Router } from '../router/router.js';
import type { OutputMode } from '../router/output-modes.js';
import type { Tally } from '../router/tally.js';
import type { MidiFileContent } from './smf.js';

export interface TickedMessage {
  readonly tick: number;
  readonly data: readonly number[];
}

export interface RenderSummary {
  readonly notesIn: number;
  readonly notesOut: number;
  readonly notesDropped: number;
  /** Why, in words (commonest first). */
  readonly dropped: string;
  /** Notes sounded as another spelling than the one decided (a sample set lacking it). */
  readonly substitutions: number;
  readonly mode: OutputMode;
  /** Output channels that carried notes, 0…15. */
  readonly channelsUsed: readonly number[];
  /** Tuning messages sent: pitch bends for tuning, or MTS messages. */
  readonly retunes: number;
  readonly steals: number;
  readonly outOfRange: number;
  /** Adaptive tunings: notes placed at a compromise pitch. */
  readonly compromises: number;
  readonly malformedBytes: number;
  /** Bytes sent per byte received while playing (set-up and the closing panic excluded). */
  readonly bytesPerInputByte: number;
  /** Bytes of the whole output (set-up and closing panic included) per byte of input. */
  readonly wholeBytesPerInputByte: number;
}

/** An engine as `createEngine` builds it. */
export interface Engine {
  readonly router: Router;
  readonly tally: Tally;
  readonly options: Pick<EngineOptions, 'mode' | 'releaseGuardMs' | 'gather'>;
}

/**
 * Runs a file's events through the engine: set-up at tick 0, every event at its own tick and
 * time; at the last tick every key and pedal is let go, and once the release guard has passed a
 * panic closes the file, so nothing is left sounding or bent and no release tail is retuned.
 * Chords are gathered as the engine is set: equal onsets (`same-time`), or a time window as live.
 */
export function renderEvents(
  content: MidiFileContent,
  engine: Engine,
  /** Told the tick each batch of output belongs to, before it is produced (for observers). */
  atTick: (tick: number) => void = () => undefined,
  /** Receives each output message's time in ms, in the same order as the messages (for audio). */
  withTimes?: (times: number[]) => void,
): { messages: TickedMessage[]; summary: RenderSummary } {
  const { router, tally, options } = engine;
  const messages: TickedMessage[] = [];
  const times: number[] = [];
  let bytesIn = 0;
  let bytesOut = 0;
  let bytesAll = 0;
  const take = (tick: number, out: ReadonlyArray<{ time: number; data: readonly number[] }>, playing: boolean): void => {
    for (const m of out) {
      if (playing) bytesOut += m.data.length;
      bytesAll += m.data.length;
      messages.push({ tick, data: m.data });
      times.push(m.time);
    }
  };
  take(0, router.start(0), false);
  const timed = typeof options.gather === 'number' && options.gather > 0;
  let lastTime = 0;
  let lastTick = 0;
  for (const event of content.events) {
    if (event.time !== lastTime) {
      atTick(lastTick);
      take(lastTick, timed ? router.tick(event.time) : router.flush(lastTime), true); // the previous chord, at its own tick
    }
    bytesIn += event.data.length;
    lastTime = event.time;
    lastTick = event.tick;
    atTick(event.tick);
    take(event.tick, router.process(event.time, event.data), true);
  }
  atTick(lastTick);
  take(lastTick, router.flush(lastTime), true);
  take(content.lastTick, router.releaseAll(lastTime), false);
  const closingTick = content.lastTick + Math.ceil(options.releaseGuardMs / content.msPerTickAtEnd);
  take(closingTick, router.close(lastTime + options.releaseGuardMs), false);
  withTimes?.(times);
  return {
    messages,
    summary: {
      notesIn: tally.notesIn,
      notesOut: tally.notesOut,
      notesDropped: tally.notesDropped,
      dropped: tally.dropSummary(),
      substitutions: tally.substitutions,
      mode: options.mode,
      channelsUsed: tally.channelsUsed(),
      retunes: tally.retunes,
      steals: tally.steals,
      outOfRange: tally.outOfRange,
      compromises: tally.compromises,
      malformedBytes: tally.malformedBytes,
      bytesPerInputByte: bytesIn === 0 ? 0 : bytesOut / bytesIn,
      wholeBytesPerInputByte: bytesIn === 0 ? 0 : bytesAll / bytesIn,
    },
  };
}
