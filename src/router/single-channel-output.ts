import { bendSensitivity, pitchBend } from '../midi/bytes.js';
import { BEND_CENTRE } from '../midi/pitch-bend.js';
import type { Emit } from './output.js';

/**
 * What the one-channel outputs (mts-note, mts-octave, pass) share: zone messages and the wheel go
 * to their channel, whose bend range is set to the keyboard's wheel range so the wheel passes
 * through as it is; panic and resets centre that channel's bend.
 */
export abstract class SingleChannelOutput {
  readonly zoneChannels: readonly number[];
  readonly allChannels: readonly number[];
  protected used = false;

  constructor(protected readonly channel: number) {
    this.zoneChannels = [channel];
    this.allChannels = [channel];
  }

  /** RPN 0 at the wheel's range (unless the synth is set by hand), and a centred bend. */
  protected startChannel(emit: Emit, wheelRange: number, sendBendRange: boolean): void {
    if (sendBendRange) for (const m of bendSensitivity(this.channel, wheelRange)) emit(m);
    emit(pitchBend(this.channel, BEND_CENTRE));
  }

  wheel(value: number, _range: number, _time: number, emit: Emit): void {
    emit(pitchBend(this.channel, value));
  }

  reassert(emit: Emit): void {
    emit(pitchBend(this.channel, BEND_CENTRE));
  }

  panic(emit: Emit): void {
    emit(pitchBend(this.channel, BEND_CENTRE));
  }

  usedChannels(): number[] {
    return this.used ? [this.channel] : [];
  }
}
