import { MidiStreamParser } from './parser.js';

/**
 * Longest system-exclusive message taken from a live input, F0 and F7 included. MTS messages are
 * far shorter (a full single-note retune of 128 keys is 523 bytes).
 */
export const LIVE_MAX_SYSEX_BYTES = 4096;

/**
 * Time a live system-exclusive message may take from its F0 to its F7. Over a DIN line (31.25
 * kbaud, 10 bits a byte: 3125 bytes a second, MIDI 1.0) the longest one allowed takes 1.31 s, so
 * this limit never cuts a message the length limit lets through; a device that sends F0 and then
 * nothing (or only data) no longer holds the input.
 */
export const LIVE_SYSEX_TIME_LIMIT_MS = 1500;

/** What one input has dropped so far. */
export interface InputDrops {
  /** Bytes that did not form a whole, valid message (system-exclusive bytes included). */
  readonly bytes: number;
  /** System-exclusive messages dropped: cut short by a status byte, too long, or too slow. */
  readonly sysex: number;
  /** Of those, the ones not finished within the time limit. */
  readonly sysexTimedOut: number;
}

export const NO_DROPS: InputDrops = { bytes: 0, sysex: 0, sysexTimedOut: 0 };

/**
 * One live input's bytes into whole messages: the stream parser (running status, real-time bytes
 * anywhere, system exclusive) with a bound on a system-exclusive message's length and time.
 * Pure: time arrives with the bytes (`feed`) or alone (`expire`, from the shell's timer).
 */
export class InputStream {
  private readonly parser: MidiStreamParser;
  private sysexSince = 0;
  private timedOut = 0;

  constructor(
    private readonly limits: { readonly maxSysexBytes: number; readonly sysexTimeLimitMs: number } = {
      maxSysexBytes: LIVE_MAX_SYSEX_BYTES,
      sysexTimeLimitMs: LIVE_SYSEX_TIME_LIMIT_MS,
    },
  ) {
    this.parser = new MidiStreamParser({ maxSysexBytes: limits.maxSysexBytes });
  }

  get drops(): InputDrops {
    return { bytes: this.parser.dropped, sysex: this.parser.droppedSysex, sysexTimedOut: this.timedOut };
  }

  /** Feeds bytes that arrived at `time`; each whole message goes to `onMessage` in order. */
  feed(time: number, bytes: ArrayLike<number>, onMessage: (message: number[]) => void): void {
    this.expire(time);
    this.parser.feed(bytes, onMessage);
    // A system-exclusive message still open began at the last F0 of these bytes, if they hold one.
    for (let i = 0; i < bytes.length; i++) {
      if (bytes[i] === 0xf0) {
        this.sysexSince = time;
        break;
      }
    }
  }

  /** Drops a system-exclusive message still unfinished after the time limit. */
  expire(time: number): void {
    if (this.parser.pendingSysexBytes > 0 && time - this.sysexSince > this.limits.sysexTimeLimitMs) {
      this.parser.dropSysex();
      this.timedOut++;
    }
  }

  /** The port went away: a message in progress is dropped. */
  reset(): void {
    this.parser.reset();
  }
}

/** The drops in words, for a display: empty when nothing was dropped. */
export function describeDrops(d: InputDrops): string {
  if (d.bytes === 0) return '';
  const parts = [`${d.bytes} malformed input byte${d.bytes === 1 ? '' : 's'} dropped`];
  if (d.sysex > 0) {
    const late = d.sysexTimedOut > 0 ? `, ${d.sysexTimedOut} of them unfinished after ${LIVE_SYSEX_TIME_LIMIT_MS / 1000} s` : '';
    parts.push(`${d.sysex} incomplete system-exclusive message${d.sysex === 1 ? '' : 's'}${late}`);
  }
  return parts.join('; ');
}

/** Adds two inputs' drops. */
export function addDrops(a: InputDrops, b: InputDrops): InputDrops {
  return { bytes: a.bytes + b.bytes, sysex: a.sysex + b.sysex, sysexTimedOut: a.sysexTimedOut + b.sysexTimedOut };
}
