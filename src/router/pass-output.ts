import { keyOf } from '../pitch/index.js';
import type { OutputContext, OutputModeEntry, OutputStrategy, Placement } from './output.js';
import type { TunedNote } from './pitch-table.js';
import { SingleChannelOutput } from './single-channel-output.js';

/** The synth's own 12-ET, untouched: every note on one channel at its own key, for A/B comparison. */
export class PassOutput extends SingleChannelOutput implements OutputStrategy {
  start(context: OutputContext): void {
    this.startChannel(context);
  }

  place(note: TunedNote): Placement {
    return { channel: this.channel, key: keyOf(note.pitch) };
  }

  voiceEnded(): void {}
}

export const passMode: OutputModeEntry = {
  summary: "the synth's own 12-ET on one channel, for comparison",
  channels: 'one',
  defaultChannels: [0],
  settings: [],
  retuneLabel: 'tuning messages',
  create: (request) => new PassOutput(request.channels[0] ?? 0, request.wheelRange, request.sendBendRange),
};
