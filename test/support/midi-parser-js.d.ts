declare module 'midi-parser-js' {
  interface ParsedEvent {
    deltaTime: number;
    type: number;
    channel?: number;
    metaType?: number;
    data?: number | number[] | string;
  }
  interface ParsedMidi {
    formatType: number;
    tracks: number;
    timeDivision: number | number[];
    track: Array<{ event: ParsedEvent[] }>;
  }
  interface ReadCursor {
    readIntVLV(): number;
    readInt(bytes: number): number;
  }
  const MidiParser: {
    parse(input: Uint8Array): ParsedMidi | false;
    customInterpreter: ((type: number, file: ReadCursor, metaLength: number | false) => unknown) | null;
  };
  export default MidiParser;
}
