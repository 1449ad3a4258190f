import { parseMidi, writeMidi, type MidiData, type MidiEvent, type MidiHeader } from 'midi-file';
import { UserError } from '../util/errors.js';

/** One event of a Standard MIDI File, as raw MIDI bytes at an absolute tick and time. */
export interface FileEvent {
  readonly tick: number;
  /** Milliseconds from the start, through the file's tempo map. */
  readonly time: number;
  readonly data: readonly number[];
}

/** A Standard MIDI File reduced to what diesis needs: its MIDI events in order, and the rest kept aside. */
export interface MidiFileContent {
  /** The file's time division, kept for the output: ticks per beat, or SMPTE frames and ticks per frame. */
  readonly division: Pick<MidiHeader, 'ticksPerBeat' | 'framesPerSecond' | 'ticksPerFrame'>;
  /** Channel and system-exclusive events of every track, merged in time order. */
  readonly events: readonly FileEvent[];
  /** Meta events (tempo, time and key signatures, names, markers) at absolute ticks, for the output's conductor track. */
  readonly meta: ReadonlyArray<{ readonly tick: number; readonly event: MidiEvent }>;
  readonly lastTick: number;
  /** Milliseconds per tick under the tempo in force at the end. */
  readonly msPerTickAtEnd: number;
}

type Timing = { kind: 'beats'; ticksPerBeat: number } | { kind: 'smpte'; ticksPerSecond: number };

function timing(data: MidiData): Timing {
  const { ticksPerBeat, framesPerSecond, ticksPerFrame } = data.header;
  if (ticksPerBeat) return { kind: 'beats', ticksPerBeat };
  if (framesPerSecond && ticksPerFrame) return { kind: 'smpte', ticksPerSecond: framesPerSecond * ticksPerFrame };
  return { kind: 'beats', ticksPerBeat: 480 };
}

/** Raw bytes of a channel or sysex event; undefined for meta events. */
export function eventBytes(e: MidiEvent): number[] | undefined {
  switch (e.type) {
    case 'noteOn':
      return [0x90 | e.channel, e.noteNumber, e.velocity];
    case 'noteOff':
      return [0x80 | e.channel, e.noteNumber, e.velocity];
    case 'noteAftertouch':
      return [0xa0 | e.channel, e.noteNumber, e.amount];
    case 'controller':
      return [0xb0 | e.channel, e.controllerType, e.value];
    case 'programChange':
      return [0xc0 | e.channel, e.programNumber];
    case 'channelAftertouch':
      return [0xd0 | e.channel, e.amount];
    case 'pitchBend': {
      const v = e.value + 0x2000;
      return [0xe0 | e.channel, v & 0x7f, (v >> 7) & 0x7f];
    }
    case 'sysEx':
      return [0xf0, ...Array.from(e.data)];
    case 'endSysEx':
      return Array.from(e.data); // an escaped packet: raw bytes, whatever they are
    default:
      return undefined;
  }
}

/** Converts raw message bytes back to a file event; undefined for what a file cannot carry (real-time bytes). */
export function bytesEvent(data: readonly number[], deltaTime: number): MidiEvent | undefined {
  const status = data[0] ?? 0;
  const channel = status & 0x0f;
  const a = data[1] ?? 0;
  const b = data[2] ?? 0;
  switch (status & 0xf0) {
    case 0x80:
      return { deltaTime, type: 'noteOff', channel, noteNumber: a, velocity: b };
    case 0x90:
      return b === 0 ? { deltaTime, type: 'noteOff', channel, noteNumber: a, velocity: 0, byte9: true } : { deltaTime, type: 'noteOn', channel, noteNumber: a, velocity: b };
    case 0xa0:
      return { deltaTime, type: 'noteAftertouch', channel, noteNumber: a, amount: b };
    case 0xb0:
      return { deltaTime, type: 'controller', channel, controllerType: a, value: b };
    case 0xc0:
      return { deltaTime, type: 'programChange', channel, programNumber: a };
    case 0xd0:
      return { deltaTime, type: 'channelAftertouch', channel, amount: a };
    case 0xe0:
      return { deltaTime, type: 'pitchBend', channel, value: (a | (b << 7)) - 0x2000 };
  }
  if (status === 0xf0) return { deltaTime, type: 'sysEx', data: data.slice(1) };
  return undefined;
}

/** Reads a Standard MIDI File (format 0, 1 or 2; tempo map applied to every track). */
export function readMidiFile(bytes: Uint8Array, file: string): MidiFileContent {
  let data: MidiData;
  try {
    data = parseMidi(bytes);
  } catch (error) {
    throw new UserError(`${file}: not a readable Standard MIDI File (${error instanceof Error ? error.message : String(error)})`);
  }
  const clock = timing(data);
  const all: Array<{ tick: number; order: number; event: MidiEvent }> = [];
  let order = 0;
  for (const track of data.tracks) {
    let tick = 0;
    for (const event of track) {
      tick += event.deltaTime;
      all.push({ tick, order: order++, event });
    }
  }
  all.sort((x, y) => x.tick - y.tick || x.order - y.order);
  // Tempo map: milliseconds at each tempo change (SMF: microseconds per quarter note, 500000 by default).
  let lastTick = 0;
  let lastMs = 0;
  let usPerBeat = 500_000;
  const toMs = (tick: number): number =>
    clock.kind === 'smpte' ? (tick / clock.ticksPerSecond) * 1000 : lastMs + ((tick - lastTick) * usPerBeat) / 1000 / clock.ticksPerBeat;
  const events: FileEvent[] = [];
  const meta: Array<{ tick: number; event: MidiEvent }> = [];
  for (const { tick, event } of all) {
    const time = toMs(tick);
    if (event.type === 'setTempo' && clock.kind === 'beats') {
      lastMs = time;
      lastTick = tick;
      usPerBeat = event.microsecondsPerBeat;
    }
    const raw = eventBytes(event);
    if (raw) events.push({ tick, time, data: raw });
    else if (event.type !== 'endOfTrack') meta.push({ tick, event });
  }
  const division = clock.kind === 'beats' ? { ticksPerBeat: clock.ticksPerBeat } : { framesPerSecond: data.header.framesPerSecond, ticksPerFrame: data.header.ticksPerFrame };
  const msPerTickAtEnd = clock.kind === 'smpte' ? 1000 / clock.ticksPerSecond : usPerBeat / 1000 / clock.ticksPerBeat;
  return { division, events, meta, lastTick: all.length ? (all[all.length - 1]?.tick ?? 0) : 0, msPerTickAtEnd };
}

/** Writes format 1: a conductor track with the meta events, then one track of MIDI messages. */
export function writeMidiFile(
  division: MidiFileContent['division'],
  meta: ReadonlyArray<{ readonly tick: number; readonly event: MidiEvent }>,
  tracks: ReadonlyArray<ReadonlyArray<{ readonly tick: number; readonly data: readonly number[] }>>,
): Uint8Array {
  const withDeltas = <T extends { tick: number }>(items: readonly T[], make: (item: T, delta: number) => MidiEvent | undefined): MidiEvent[] => {
    const out: MidiEvent[] = [];
    let last = 0;
    for (const item of items) {
      const event = make(item, item.tick - last);
      if (!event) continue;
      out.push(event);
      last = item.tick;
    }
    out.push({ deltaTime: 0, type: 'endOfTrack' });
    return out;
  };
  const conductor = withDeltas(meta, (m, delta) => ({ ...m.event, deltaTime: delta }) as MidiEvent);
  const rest = tracks.map((t) => withDeltas(t, (m, delta) => bytesEvent(m.data, delta)));
  return Uint8Array.from(writeMidi({ header: { format: 1, numTracks: 1 + rest.length, ...division }, tracks: [conductor, ...rest] }, { running: true }));
}
