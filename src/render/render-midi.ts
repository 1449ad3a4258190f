import type { Router } from '../router/router.js';
import type { MidiFileContent } from './smf.js';

export interface TickedMessage {
  readonly tick: number;
  readonly data: readonly number[];
}

export interface RenderSummary {
  readonly notesIn: number;
  readonly notesOut: number;
  readonly notesDropped: number;
  readonly mode: string;
  /** Output channels that carried notes, 0…15. */
  readonly channelsUsed: readonly number[];
  /** Tuning messages sent: pitch bends for tuning, or MTS messages. */
  readonly retunes: number;
  readonly steals: number;
  readonly outOfRange: number;
  readonly malformedBytes: number;
  /** Bytes sent per byte received while playing (set-up and the closing panic excluded). */
  readonly bytesPerInputByte: number;
}

/**
 * Runs a file's events through the engine: set-up at tick 0, every event at its own tick and
 * time; at the last tick every key and pedal is let go, and once the release guard has passed a
 * panic closes the file, so nothing is left sounding or bent and no release tail is retuned.
 */
export function renderEvents(
  content: MidiFileContent,
  router: Router,
  releaseGuardMs: number,
  /** Told the tick each batch of output belongs to, before it is produced (for observers). */
  atTick: (tick: number) => void = () => undefined,
  /** Receives each output message's time in ms, in the same order as the messages (for audio). */
  withTimes?: (times: number[]) => void,
): { messages: TickedMessage[]; summary: RenderSummary } {
  const messages: TickedMessage[] = [];
  const times: number[] = [];
  const push = (tick: number, m: { time: number; data: readonly number[] }): void => {
    messages.push({ tick, data: m.data });
    times.push(m.time);
  };
  for (const m of router.start(0)) push(0, m);
  let bytesIn = 0;
  let bytesOut = 0;
  let lastTime = 0;
  let lastTick = 0;
  const take = (tick: number, out: ReadonlyArray<{ time: number; data: readonly number[] }>): void => {
    for (const m of out) {
      bytesOut += m.data.length;
      push(tick, m);
    }
  };
  for (const event of content.events) {
    if (event.time !== lastTime) {
      atTick(lastTick);
      take(lastTick, router.flush(lastTime)); // the chord of the previous onset time, at its own tick
    }
    bytesIn += event.data.length;
    lastTime = event.time;
    lastTick = event.tick;
    atTick(event.tick);
    take(event.tick, router.process(event.time, event.data));
  }
  atTick(lastTick);
  take(lastTick, router.flush(lastTime));
  for (const m of router.releaseAll(lastTime)) push(content.lastTick, m);
  const closingTick = content.lastTick + Math.ceil(releaseGuardMs / content.msPerTickAtEnd);
  for (const m of router.panic(lastTime + releaseGuardMs, 'end of file')) push(closingTick, m);
  withTimes?.(times);
  const { stats, output } = router;
  return {
    messages,
    summary: {
      notesIn: stats.notesIn,
      notesOut: stats.notesOut,
      notesDropped: stats.notesDropped,
      mode: output.mode,
      channelsUsed: output.usedChannels(),
      retunes: output.counters.retunes,
      steals: output.counters.steals,
      outOfRange: stats.outOfRange,
      malformedBytes: stats.malformedBytes,
      bytesPerInputByte: bytesIn === 0 ? 0 : bytesOut / bytesIn,
    },
  };
}
