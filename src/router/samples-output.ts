import { chromaOf, keyOf } from '../pitch/index.js';
import type { Emit, OutputCounters, OutputStrategy, Placement } from './output.js';
import type { TunedNote } from './pitch-table.js';

/**
 * A retuned sample set: every spelled pitch class has its own channel, where each key holds a
 * sample already at that spelling's frequency. A note goes to its spelling's channel at its own
 * key, with no bend; a spelling the set lacks takes the set's other spelling of the same key.
 */
export class SamplesOutput implements OutputStrategy {
  readonly mode = 'samples';
  readonly counters: OutputCounters = { retunes: 0, steals: 0 };
  readonly zoneChannels: readonly number[];
  readonly allChannels: readonly number[];
  private readonly used = new Set<number>();

  /** `layout`: line-of-fifths position of each spelling → its channel (0…15). */
  constructor(private readonly layout: ReadonlyMap<number, number>) {
    this.zoneChannels = [...new Set(layout.values())].sort((a, b) => a - b);
    this.allChannels = this.zoneChannels;
  }

  start(): void {}

  place(note: TunedNote): Placement | undefined {
    let channel = this.layout.get(note.pitch.fifths);
    if (channel === undefined) {
      const chroma = chromaOf(note.pitch);
      const other = [...this.layout.keys()].filter((f) => chromaOf({ fifths: f }) === chroma).sort((a, b) => Math.abs(a - note.pitch.fifths) - Math.abs(b - note.pitch.fifths))[0];
      channel = other === undefined ? undefined : this.layout.get(other);
    }
    if (channel === undefined) return undefined;
    this.used.add(channel);
    return { channel, key: keyOf(note.pitch) };
  }

  voiceEnded(): void {}

  unitOf(): number {
    return -1;
  }

  retune(): boolean {
    return false;
  }

  wheel(value: number, _range: number, _time: number, emit: Emit): void {
    for (const c of this.zoneChannels) emit([0xe0 | c, value & 0x7f, value >> 7]);
  }

  reassert(): void {}

  panic(emit: Emit): void {
    for (const c of this.zoneChannels) emit([0xe0 | c, 0, 64]);
  }

  usedChannels(): number[] {
    return [...this.used];
  }
}
