import { pitchBend } from '../midi/bytes.js';
import { BEND_CENTRE } from '../midi/pitch-bend.js';
import { chromaOf, keyOf, onKey, pitchClass, type SpelledPitch } from '../pitch/index.js';
import { UserError } from '../util/errors.js';
import type { OutputContext, OutputModeEntry, OutputStrategy, Placement } from './output.js';
import type { TunedNote } from './pitch-table.js';

/**
 * A retuned sample set: every spelled pitch class has its own channel, where each key holds a
 * sample already at that spelling's frequency. A note goes to its spelling's channel at its own
 * key, with no bend; a spelling the set lacks is played (and reported) as the set's nearest
 * spelling of the same key on the line of fifths.
 */
export class SamplesOutput implements OutputStrategy {
  readonly zoneChannels: readonly number[];
  readonly allChannels: readonly number[];

  /**
   * `layout`: line-of-fifths position of each spelling → its channel (0…15); `keys`: the
   * (channel · 128 + key) pairs that have a sample (a set covers the instrument's compass only).
   */
  constructor(
    private readonly layout: ReadonlyMap<number, number>,
    private readonly keys?: ReadonlySet<number>,
  ) {
    this.zoneChannels = [...new Set(layout.values())].sort((a, b) => a - b);
    this.allChannels = this.zoneChannels;
  }

  start(): void {}

  available(pitch: SpelledPitch): SpelledPitch {
    if (this.layout.has(pitch.fifths)) return pitch;
    const chroma = chromaOf(pitch);
    let best: number | undefined;
    for (const f of this.layout.keys()) {
      if (chromaOf(pitchClass(f)) !== chroma) continue;
      if (best === undefined || Math.abs(f - pitch.fifths) < Math.abs(best - pitch.fifths)) best = f;
    }
    return best === undefined ? pitch : onKey(pitchClass(best), keyOf(pitch));
  }

  place(note: TunedNote, _time: number, context: OutputContext): Placement | undefined {
    const channel = this.layout.get(note.pitch.fifths);
    const key = keyOf(note.pitch);
    if (channel === undefined) return undefined;
    if (this.keys && !this.keys.has(channel * 128 + key)) {
      context.refuse(`the sample set has no sample for key ${key} (outside the compass it was built for)`);
      return undefined;
    }
    return { channel, key };
  }

  voiceEnded(): void {}

  wheel(value: number, _range: number, _time: number, context: OutputContext): void {
    for (const c of this.zoneChannels) context.emit(pitchBend(c, value));
  }

  panic(context: OutputContext, _time?: number): void {
    for (const c of this.zoneChannels) context.emit(pitchBend(c, BEND_CENTRE));
  }
}

export const samplesMode: OutputModeEntry = {
  summary: 'a retuned sample set made by "diesis samples": a channel per spelling, no bends',
  channels: 'set',
  defaultChannels: [],
  settings: ['sampleSet'],
  retuneLabel: 'tuning messages',
  create(request) {
    if (!request.sampleLayout) throw new UserError('--mode samples needs a sample set: give --sample-set DIR (made by "diesis samples")', 2);
    return new SamplesOutput(request.sampleLayout, request.sampleKeys);
  },
};
