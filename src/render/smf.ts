import { UserError } from '../util/errors.js';

// Standard MIDI Files, read and written by diesis itself, following "Standard MIDI Files 1.0"
// (MIDI Manufacturers Association, in the Complete MIDI 1.0 Detailed Specification). The reader
// is strict where that document is (a variable-length quantity has at most 4 bytes, a track ends
// with End of Track, a chunk lies within the file, data bytes are below 0x80) and lenient where it
// says to be (chunks of unknown type are skipped; a header longer than 6 bytes is honoured).
// Every error is one line naming the file, the byte offset and the problem.

/** One event of a Standard MIDI File, as raw MIDI bytes at an absolute tick and time. */
export interface FileEvent {
  readonly tick: number;
  /** Milliseconds from the start, through the file's tempo map. */
  readonly time: number;
  readonly data: readonly number[];
}

/** A meta event (`FF type length data`): tempo, time and key signatures, names, markers… */
export interface MetaEvent {
  readonly type: number;
  readonly data: readonly number[];
}

/** The file's time division: ticks per quarter note, or SMPTE frames per second and ticks per frame. */
export type Division = { readonly ticksPerBeat: number } | { readonly framesPerSecond: number; readonly ticksPerFrame: number };

/** A Standard MIDI File reduced to what diesis needs: its MIDI events in order, and the rest kept aside. */
export interface MidiFileContent {
  readonly division: Division;
  /** Channel and system-exclusive events of every track, merged in time order. */
  readonly events: readonly FileEvent[];
  /** Meta events at absolute ticks (End of Track excluded), for the output's conductor track. */
  readonly meta: ReadonlyArray<{ readonly tick: number; readonly meta: MetaEvent }>;
  readonly lastTick: number;
  /** Milliseconds per tick under the tempo in force at the end. */
  readonly msPerTickAtEnd: number;
}

export const META = { text: 0x01, trackName: 0x03, endOfTrack: 0x2f, tempo: 0x51 } as const;

/** The largest delta-time a 4-byte variable-length quantity holds (SMF 1.0: 0x0FFFFFFF). */
export const MAX_DELTA = 0x0fffffff;

/** A tempo meta event: microseconds per quarter note, 3 bytes big-endian. */
export function tempoMeta(microsecondsPerBeat: number): MetaEvent {
  return { type: META.tempo, data: [(microsecondsPerBeat >> 16) & 0xff, (microsecondsPerBeat >> 8) & 0xff, microsecondsPerBeat & 0xff] };
}

export function textMeta(type: number, text: string): MetaEvent {
  return { type, data: [...new TextEncoder().encode(text)] };
}

/** Bytes a channel message carries after its status (SMF 1.0 uses MIDI 1.0's lengths). */
function dataLength(status: number): number {
  const kind = status & 0xf0;
  return kind === 0xc0 || kind === 0xd0 ? 1 : 2;
}

const hex = (b: number): string => `0x${b.toString(16).toUpperCase().padStart(2, '0')}`;

/** Reads bytes with a position, failing in one line that names the file and the byte offset. */
class SmfCursor {
  at = 0;
  constructor(
    readonly bytes: Uint8Array,
    private readonly file: string,
  ) {}

  fail(message: string, at = this.at): never {
    throw new UserError(`${this.file}: byte ${at}: ${message}`);
  }

  byte(end: number, what: string): number {
    if (this.at >= end) this.fail(`${what} runs past the end of its track (the track is cut short or its length is wrong)`);
    return this.bytes[this.at++]!;
  }

  uint(size: number): number {
    let value = 0;
    for (let i = 0; i < size; i++) value = value * 256 + this.bytes[this.at++]!;
    return value;
  }

  /** A variable-length quantity: at most 4 bytes, so at most 0x0FFFFFFF (SMF 1.0, "Conventions"). */
  vlq(end: number, what: string): number {
    const start = this.at;
    let value = 0;
    for (let i = 0; i < 4; i++) {
      const b = this.byte(end, what);
      value = value * 128 + (b & 0x7f);
      if ((b & 0x80) === 0) return value;
    }
    return this.fail(`${what} is a variable-length number longer than 4 bytes (the largest allowed is 0x0FFFFFFF)`, start);
  }

  text(size: number): string {
    return String.fromCharCode(...this.bytes.subarray(this.at, this.at + size));
  }
}

interface TrackItem {
  readonly tick: number;
  readonly order: number;
  readonly data?: readonly number[];
  readonly meta?: MetaEvent;
}

function readTrack(c: SmfCursor, end: number, track: number, into: TrackItem[], order: { n: number }): void {
  let tick = 0;
  let running = 0;
  while (c.at < end) {
    const eventAt = c.at;
    tick += c.vlq(end, `track ${track}: a delta-time`);
    if (c.at >= end) c.fail(`track ${track}: an event runs past the end of its track (the track is cut short or its length is wrong)`);
    let status = c.bytes[c.at]!;
    if (status >= 0x80) c.at++;
    else if (running === 0) c.fail(`track ${track}: data byte ${hex(status)} with no status byte before it`);
    else status = running;
    if (status < 0xf0) {
      running = status;
      const data = [status];
      for (let i = 0; i < dataLength(status); i++) {
        const b = c.byte(end, `track ${track}: a ${hex(status & 0xf0)} message`);
        if (b >= 0x80) c.fail(`track ${track}: data byte ${hex(b)} of a ${hex(status & 0xf0)} message is not below 0x80`, c.at - 1);
        data.push(b);
      }
      into.push({ tick, order: order.n++, data });
      continue;
    }
    running = 0; // system-exclusive and meta events cancel running status (SMF 1.0)
    if (status === 0xf0 || status === 0xf7) {
      const size = c.vlq(end, `track ${track}: a system-exclusive length`);
      if (c.at + size > end) c.fail(`track ${track}: a system-exclusive event of ${size} bytes runs past the end of its track`, eventAt);
      const body = [...c.bytes.subarray(c.at, c.at + size)];
      c.at += size;
      into.push({ tick, order: order.n++, data: status === 0xf0 ? [0xf0, ...body] : body });
      continue;
    }
    if (status !== 0xff) c.fail(`track ${track}: status byte ${hex(status)} cannot appear in a Standard MIDI File (only channel messages, F0/F7 system exclusive and FF meta events)`, c.at - 1);
    const type = c.byte(end, `track ${track}: a meta event`);
    if (type >= 0x80) c.fail(`track ${track}: meta event type ${hex(type)} is not below 0x80`, c.at - 1);
    const size = c.vlq(end, `track ${track}: a meta event's length`);
    if (c.at + size > end) c.fail(`track ${track}: a meta event of ${size} bytes runs past the end of its track`, eventAt);
    const data = [...c.bytes.subarray(c.at, c.at + size)];
    c.at += size;
    if (type === META.endOfTrack) {
      if (c.at < end) c.fail(`track ${track}: ${end - c.at} bytes follow its End of Track (the track's length is wrong)`);
      return;
    }
    if (type === META.tempo) {
      if (size !== 3) c.fail(`track ${track}: a tempo event must hold 3 bytes, not ${size}`, eventAt);
      if (data[0] === 0 && data[1] === 0 && data[2] === 0) c.fail(`track ${track}: a tempo of 0 microseconds per quarter note`, eventAt);
    }
    into.push({ tick, order: order.n++, meta: { type, data } });
  }
  c.fail(`track ${track} ends without an End of Track event (the file is cut short or the track's length is wrong)`, end);
}

/** Reads a Standard MIDI File (format 0, 1 or 2; the tempo map applied to every track). */
export function readMidiFile(bytes: Uint8Array, file: string): MidiFileContent {
  const c = new SmfCursor(bytes, file);
  if (bytes.length > 0 && (bytes[0] === 0x7b || bytes[0] === 0x2f)) throw new UserError(`${file}: a JSON file, not a Standard MIDI File (a setup goes with --setup)`); // "{" or "//": a setup or tuning
  if (bytes.length < 14 || c.text(4) !== 'MThd') throw new UserError(`${file}: not a readable Standard MIDI File (it does not begin with an MThd header)`);
  c.at = 4;
  const headerLength = c.uint(4);
  if (headerLength < 6) c.fail(`the header is ${headerLength} bytes long; it must hold at least 6`, 4);
  if (8 + headerLength > bytes.length) c.fail(`the header says it is ${headerLength} bytes long, but the file ends after ${bytes.length - 8}`, 4);
  const format = c.uint(2);
  const trackCount = c.uint(2);
  const divisionWord = c.uint(2);
  if (format > 2) c.fail(`format ${format} is not 0, 1 or 2`, 8);
  let division: Division;
  if (divisionWord & 0x8000) {
    const framesPerSecond = 256 - (divisionWord >> 8);
    const ticksPerFrame = divisionWord & 0xff;
    if (![24, 25, 29, 30].includes(framesPerSecond) || ticksPerFrame === 0) c.fail(`the SMPTE division ${hex(divisionWord >> 8)} ${hex(ticksPerFrame)} is not 24, 25, 29 or 30 frames with at least one tick per frame`, 12);
    division = { framesPerSecond, ticksPerFrame };
  } else {
    if (divisionWord === 0) c.fail('the division is 0 ticks per quarter note', 12);
    division = { ticksPerBeat: divisionWord };
  }
  c.at = 8 + headerLength; // a longer header is honoured: its extra bytes are skipped (SMF 1.0)
  const items: TrackItem[] = [];
  const order = { n: 0 };
  let tracks = 0;
  while (c.at < bytes.length) {
    const chunkAt = c.at;
    if (bytes.length - c.at < 8) {
      if (tracks >= trackCount) break; // a few bytes of padding after the last track
      c.fail(`${bytes.length - c.at} bytes where a chunk header (8 bytes) should be: the file is cut short`);
    }
    const type = c.text(4);
    c.at += 4;
    const length = c.uint(4);
    const end = c.at + length;
    if (end > bytes.length) {
      const what = type === 'MTrk' ? `track ${tracks + 1}` : `the "${type}" chunk`;
      c.fail(`${what} says it holds ${length} bytes, but the file ends after ${bytes.length - c.at} (the file is cut short or the length is wrong)`, chunkAt);
    }
    if (type === 'MTrk') readTrack(c, end, ++tracks, items, order);
    c.at = end; // a chunk of any other type is skipped, as SMF 1.0 asks
  }
  if (tracks < trackCount) c.fail(`the header promises ${trackCount} tracks, the file holds ${tracks}`, 10);
  return withTempoMap(items, division);
}

function withTempoMap(items: TrackItem[], division: Division): MidiFileContent {
  items.sort((x, y) => x.tick - y.tick || x.order - y.order);
  const smpteTicksPerSecond = 'ticksPerBeat' in division ? undefined : division.framesPerSecond * division.ticksPerFrame;
  const ticksPerBeat = 'ticksPerBeat' in division ? division.ticksPerBeat : 1;
  // Tempo map: milliseconds at each tempo change (SMF: microseconds per quarter note, 500000 by default).
  let lastTick = 0;
  let lastMs = 0;
  let usPerBeat = 500_000;
  const toMs = (tick: number): number => (smpteTicksPerSecond !== undefined ? (tick / smpteTicksPerSecond) * 1000 : lastMs + ((tick - lastTick) * usPerBeat) / 1000 / ticksPerBeat);
  const events: FileEvent[] = [];
  const meta: Array<{ tick: number; meta: MetaEvent }> = [];
  for (const item of items) {
    const time = toMs(item.tick);
    if (item.data) events.push({ tick: item.tick, time, data: item.data });
    else if (item.meta) {
      meta.push({ tick: item.tick, meta: item.meta });
      if (item.meta.type === META.tempo && smpteTicksPerSecond === undefined) {
        lastMs = time;
        lastTick = item.tick;
        const [a = 0, b = 0, d = 0] = item.meta.data;
        usPerBeat = a * 65536 + b * 256 + d;
      }
    }
  }
  const msPerTickAtEnd = smpteTicksPerSecond !== undefined ? 1000 / smpteTicksPerSecond : usPerBeat / 1000 / ticksPerBeat;
  return { division, events, meta, lastTick: items[items.length - 1]?.tick ?? 0, msPerTickAtEnd };
}

/** A byte buffer that doubles when full, so writing n bytes costs O(n). */
class ByteWriter {
  private buffer = new Uint8Array(1024);
  length = 0;

  private room(n: number): void {
    if (this.length + n <= this.buffer.length) return;
    let size = this.buffer.length * 2;
    while (size < this.length + n) size *= 2;
    const next = new Uint8Array(size);
    next.set(this.buffer.subarray(0, this.length));
    this.buffer = next;
  }

  byte(b: number): void {
    this.room(1);
    this.buffer[this.length++] = b;
  }

  bytes(bs: ArrayLike<number>): void {
    this.room(bs.length);
    this.buffer.set(bs, this.length);
    this.length += bs.length;
  }

  text(s: string): void {
    for (let i = 0; i < s.length; i++) this.byte(s.charCodeAt(i));
  }

  uint(value: number, size: number): void {
    for (let i = size - 1; i >= 0; i--) this.byte(Math.floor(value / 256 ** i) & 0xff);
  }

  setUint32(at: number, value: number): void {
    for (let i = 0; i < 4; i++) this.buffer[at + i] = (value >>> (8 * (3 - i))) & 0xff;
  }

  /** A variable-length quantity, 0 … 0x0FFFFFFF. */
  vlq(value: number): void {
    if (!Number.isInteger(value) || value < 0 || value > MAX_DELTA) throw new RangeError(`${value} does not fit a 4-byte variable-length quantity`);
    let shift = 21;
    while (shift > 0 && value < 2 ** shift) shift -= 7;
    for (; shift > 0; shift -= 7) this.byte(0x80 | (Math.floor(value / 2 ** shift) & 0x7f));
    this.byte(value & 0x7f);
  }

  result(): Uint8Array {
    return this.buffer.slice(0, this.length);
  }
}

/** Writes one track chunk: deltas (a longer silence is carried by empty text events), running status, End of Track. */
function writeTrack(w: ByteWriter, items: ReadonlyArray<{ readonly tick: number; readonly data?: readonly number[]; readonly meta?: MetaEvent }>): void {
  w.text('MTrk');
  const lengthAt = w.length;
  w.uint(0, 4);
  let last = 0;
  let running = 0;
  const delta = (tick: number): void => {
    if (tick < last) throw new RangeError(`track events out of order: tick ${tick} after ${last}`);
    let rest = tick - last;
    while (rest > MAX_DELTA) {
      // A delta-time holds at most 0x0FFFFFFF: an empty text event carries the rest of the silence.
      w.vlq(MAX_DELTA);
      w.bytes([0xff, META.text, 0]);
      running = 0;
      rest -= MAX_DELTA;
    }
    w.vlq(rest);
    last = tick;
  };
  for (const item of items) {
    if (item.meta) {
      delta(item.tick);
      w.bytes([0xff, item.meta.type]);
      w.vlq(item.meta.data.length);
      w.bytes(item.meta.data);
      running = 0;
      continue;
    }
    const data = item.data ?? [];
    const status = data[0] ?? 0;
    if (status === 0xf0) {
      delta(item.tick);
      w.byte(0xf0);
      w.vlq(data.length - 1);
      w.bytes(data.slice(1));
      running = 0;
    } else if (status >= 0x80 && status < 0xf0 && data.length === 1 + dataLength(status)) {
      delta(item.tick);
      if (status !== running) w.byte(status);
      running = status;
      w.bytes(data.slice(1));
    }
    // Real-time and system-common bytes cannot be carried by a file: they are left out.
  }
  w.bytes([0, 0xff, META.endOfTrack, 0]);
  w.setUint32(lengthAt, w.length - lengthAt - 4);
}

/** Writes format 1: a conductor track with the meta events, then one track per list of MIDI messages (each in tick order). */
export function writeMidiFile(
  division: Division,
  meta: ReadonlyArray<{ readonly tick: number; readonly meta: MetaEvent }>,
  tracks: ReadonlyArray<ReadonlyArray<{ readonly tick: number; readonly data: readonly number[] }>>,
): Uint8Array {
  const w = new ByteWriter();
  w.text('MThd');
  w.uint(6, 4);
  w.uint(1, 2);
  w.uint(1 + tracks.length, 2);
  if ('ticksPerBeat' in division) w.uint(division.ticksPerBeat, 2);
  else w.bytes([256 - division.framesPerSecond, division.ticksPerFrame]);
  writeTrack(w, meta);
  for (const track of tracks) writeTrack(w, track);
  return w.result();
}
