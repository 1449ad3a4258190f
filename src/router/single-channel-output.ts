import { bendSensitivity, pitchBend } from '../midi/bytes.js';
import { BEND_CENTRE } from '../midi/pitch-bend.js';
import { sendWheel } from './bend-output.js';
import type { OutputContext } from './output.js';

/**
 * What the one-channel outputs (mts-note, mts-octave, pass) share: zone messages and the wheel go
 * to their channel, whose bend range is set to the keyboard's wheel range so the wheel passes
 * through as it is (and follows the keyboard's own RPN 0); panic centres that channel's bend.
 */
export abstract class SingleChannelOutput {
  readonly zoneChannels: readonly number[];
  readonly allChannels: readonly number[];
  private sentRange: number;

  constructor(
    protected readonly channel: number,
    private readonly wheelRange: number,
    private readonly sendBendRange: boolean,
  ) {
    this.zoneChannels = [channel];
    this.allChannels = [channel];
    this.sentRange = wheelRange;
  }

  /** RPN 0 at the wheel's range (unless the synth is set by hand), and a centred bend. */
  protected startChannel(context: OutputContext): void {
    if (this.sendBendRange) for (const m of bendSensitivity(this.channel, this.wheelRange)) context.emit(m);
    this.sentRange = this.wheelRange;
    context.emit(pitchBend(this.channel, BEND_CENTRE));
  }

  wheel(value: number, range: number, _time: number, context: OutputContext): void {
    this.sentRange = sendWheel(this.channel, value, range, this.sendBendRange, this.wheelRange, this.sentRange, context.emit);
  }

  panic(context: OutputContext, _time?: number): void {
    context.emit(pitchBend(this.channel, BEND_CENTRE));
  }
}
