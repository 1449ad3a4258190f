import MidiParser from 'midi-parser-js';

/**
 * Reads a Standard MIDI File with midi-parser-js, a parser from the registry that shares no code
 * with the project's own reader and writer, into raw messages at absolute ticks and milliseconds.
 */
export interface ReadMessage {
  readonly tick: number;
  readonly ms: number;
  readonly data: number[];
}

export function readWithIndependentParser(bytes: Uint8Array): { format: number; tracks: number; messages: ReadMessage[] } {
  // System exclusive data as bytes (the library's default reads them as one big integer).
  MidiParser.customInterpreter = (type, file, metaLength) => {
    if (type !== 0xf || metaLength !== false) return false;
    const length = file.readIntVLV();
    return Array.from({ length }, () => file.readInt(1));
  };
  const midi = MidiParser.parse(bytes);
  MidiParser.customInterpreter = null;
  if (!midi) throw new Error('midi-parser-js could not read the file');
  const division = typeof midi.timeDivision === 'number' ? midi.timeDivision : 480;
  const all: Array<{ tick: number; order: number; data: number[]; tempo?: number }> = [];
  let order = 0;
  for (const track of midi.track) {
    let tick = 0;
    for (const e of track.event) {
      tick += e.deltaTime;
      if (e.type === 0xff) {
        if (e.metaType === 0x51 && typeof e.data === 'number') all.push({ tick, order: order++, data: [], tempo: e.data });
        continue;
      }
      const status = (e.type << 4) | (e.channel ?? 0);
      const d = e.data;
      if (e.type === 0xf) all.push({ tick, order: order++, data: [0xf0, ...(Array.isArray(d) ? d : [])] });
      else all.push({ tick, order: order++, data: [status, ...(Array.isArray(d) ? d : typeof d === 'number' ? [d] : [])] });
    }
  }
  all.sort((a, b) => a.tick - b.tick || a.order - b.order);
  let usPerBeat = 500_000;
  let baseTick = 0;
  let baseMs = 0;
  const messages: ReadMessage[] = [];
  for (const item of all) {
    const ms = baseMs + ((item.tick - baseTick) * usPerBeat) / 1000 / division;
    if (item.tempo !== undefined) {
      baseMs = ms;
      baseTick = item.tick;
      usPerBeat = item.tempo;
      continue;
    }
    messages.push({ tick: item.tick, ms, data: item.data });
  }
  return { format: midi.formatType, tracks: midi.tracks, messages };
}
