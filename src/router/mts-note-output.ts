import { noteOff } from '../midi/bytes.js';
import { encodeFrequency, mtsOutOfRangeCents, singleNoteTuning, type FrequencyData } from '../midi/mts.js';
import type { InPlaceRetuning, OutputContext, OutputModeEntry, OutputStrategy, Placement } from './output.js';
import type { TunedNote } from './pitch-table.js';
import { SingleChannelOutput } from './single-channel-output.js';

export interface MtsNoteOutputSetup {
  readonly channel: number;
  /** MTS device ID (127 = all devices) and tuning program the messages address. */
  readonly device: number;
  readonly program: number;
  readonly releaseGuardMs: number;
  readonly synthA4: number;
  readonly wheelRange: number;
  readonly sendBendRange: boolean;
}

interface Slot {
  /** The tuning last sent to this key, or undefined while unknown. */
  data: FrequencyData | undefined;
  /** Voices sounding on it: keys down and voices held by a pedal. */
  sounding: number;
  lastEnd: number;
  newestStart: number;
}

const sameData = (a: FrequencyData | undefined, b: FrequencyData): boolean => a !== undefined && a[0] === b[0] && a[1] === b[1] && a[2] === b[2];

/**
 * MIDI Tuning Standard, real-time single note tuning change, on one channel. The 128 keys are
 * tuning slots: a note goes to the slot of its nearest key, retuned first if needed; a slot is
 * retuned only when nothing sounds on it (pedal-held notes sound) and its release guard has
 * passed, so when G♯ and A♭ of one key must sound together the second takes the nearest free slot
 * instead. When no slot is free, a slot within its release guard is taken (the natural one, else
 * the nearest: only a release tail can move); only when every slot sounds is the slot whose
 * newest note started longest ago stolen (its notes get note-offs before the retune).
 */
export class MtsNoteOutput extends SingleChannelOutput implements OutputStrategy {
  readonly inPlace: InPlaceRetuning;
  private readonly slots: Slot[] = Array.from({ length: 128 }, () => ({ data: undefined, sounding: 0, lastEnd: -Infinity, newestStart: -Infinity }));

  constructor(private readonly setup: MtsNoteOutputSetup) {
    super(setup.channel, setup.wheelRange, setup.sendBendRange);
    this.inPlace = { unitOf: (p) => p.key, retune: (p, note, context) => this.retune(p.key, encodeFrequency(note.hz, this.setup.synthA4), context) };
  }

  start(context: OutputContext): void {
    this.startChannel(context);
    for (const slot of this.slots) slot.data = undefined; // the synth's tuning is unknown until we send it
  }

  private isFree(slot: Slot, time: number): boolean {
    return slot.sounding === 0 && time - slot.lastEnd >= this.setup.releaseGuardMs;
  }

  /** The slot to use: the natural one if tuned or free, else the nearest tuned or free one; `cut` when it must be taken over. */
  private choose(natural: number, data: FrequencyData, time: number): { key: number; cut: 'none' | 'tail' | 'steal' } {
    const naturalSlot = this.slots[natural]!;
    if (sameData(naturalSlot.data, data) || this.isFree(naturalSlot, time)) return { key: natural, cut: 'none' };
    let free: number | undefined;
    let tail: number | undefined;
    let oldest: number = natural;
    for (let distance = 1; distance < 128; distance++) {
      for (const key of [natural - distance, natural + distance]) {
        const slot = this.slots[key];
        if (!slot) continue;
        if (sameData(slot.data, data)) return { key, cut: 'none' };
        if (free === undefined && this.isFree(slot, time)) free = key;
        if (tail === undefined && slot.sounding === 0) tail = key;
        if (slot.newestStart < this.slots[oldest]!.newestStart) oldest = key;
      }
      if (free !== undefined) return { key: free, cut: 'none' };
    }
    if (naturalSlot.sounding === 0) return { key: natural, cut: 'tail' };
    if (tail !== undefined) return { key: tail, cut: 'tail' };
    return { key: oldest, cut: 'steal' };
  }

  place(note: TunedNote, time: number, context: OutputContext): Placement | undefined {
    // Any slot can take any frequency MTS can say; beyond that the nearest it can say is sounded and counted.
    const outside = mtsOutOfRangeCents(note.hz, this.setup.synthA4);
    if (outside !== 0) context.outOfRange(note, outside);
    const data = encodeFrequency(note.hz, this.setup.synthA4);
    const { key, cut } = this.choose(Math.max(0, Math.min(127, note.nearestKey)), data, time);
    const slot = this.slots[key]!;
    if (cut === 'steal') {
      // Under a pedal a note-off cannot silence the slot's notes: retuning it would be heard.
      if (context.pedalDown) {
        context.refuse('all 128 tuning slots are sounding and a pedal holds them');
        return undefined;
      }
      context.steal((p) => p.channel === this.setup.channel && p.key === key);
      context.emit(noteOff(this.setup.channel, key));
      slot.sounding = 0;
    }
    this.retune(key, data, context);
    slot.sounding++;
    slot.newestStart = time;
    return { channel: this.setup.channel, key };
  }

  voiceEnded(placement: Placement, time: number): void {
    const slot = this.slots[placement.key];
    if (!slot || slot.sounding === 0) return;
    slot.sounding--;
    if (slot.sounding === 0) slot.lastEnd = time;
  }

  /** Sends a slot's tuning if it differs (MTS tunes a slot to any frequency). */
  private retune(key: number, data: FrequencyData, context: OutputContext): boolean {
    const slot = this.slots[key];
    if (!slot) return false;
    if (!sameData(slot.data, data)) {
      slot.data = data;
      context.retuned();
      context.emit(singleNoteTuning(this.setup.device, this.setup.program, [{ key, data }]));
    }
    return true;
  }

  override panic(context: OutputContext, time: number): void {
    super.panic(context, time);
    for (const slot of this.slots) {
      if (slot.sounding > 0) slot.lastEnd = time; // release tails ring on: the guard starts now
      slot.sounding = 0;
    }
  }
}

export const mtsNoteMode: OutputModeEntry = {
  summary: 'MIDI Tuning Standard single-note retuning on one channel (128 tuning slots)',
  channels: 'one',
  defaultChannels: [0],
  settings: ['mtsDevice', 'mtsProgram'],
  retuneLabel: 'MTS messages',
  create: (request) =>
    new MtsNoteOutput({
      channel: request.channels[0] ?? 0,
      device: request.mtsDevice,
      program: request.mtsProgram,
      releaseGuardMs: request.releaseGuardMs,
      synthA4: request.synthA4,
      wheelRange: request.wheelRange,
      sendBendRange: request.sendBendRange,
    }),
};
