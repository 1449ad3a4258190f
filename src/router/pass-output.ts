import { pitchBend } from '../midi/bytes.js';
import { BEND_CENTRE } from '../midi/pitch-bend.js';
import { keyOf } from '../pitch/index.js';
import type { Emit, OutputCounters, OutputStrategy, Placement } from './output.js';
import type { TunedNote } from './pitch-table.js';
import { SingleChannelOutput } from './single-channel-output.js';

/** The synth's own 12-ET, untouched: every note on one channel at its own key, for A/B comparison. */
export class PassOutput extends SingleChannelOutput implements OutputStrategy {
  readonly mode = 'pass';
  readonly counters: OutputCounters = { retunes: 0, steals: 0 };

  start(emit: Emit): void {
    emit(pitchBend(this.channel, BEND_CENTRE));
  }

  place(note: TunedNote): Placement {
    this.used = true;
    return { channel: this.channel, key: keyOf(note.pitch) };
  }

  voiceEnded(): void {}

  unitOf(): number {
    return -1;
  }

  retune(): boolean {
    return false;
  }
}
