import { noteOff } from '../midi/bytes.js';
import { encodeFrequency, singleNoteTuning, type FrequencyData } from '../midi/mts.js';
import type { Emit, OutputCounters, OutputStrategy, PlaceContext, Placement } from './output.js';
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
  sounding: number;
  lastEnd: number;
  newestStart: number;
}

const sameData = (a: FrequencyData | undefined, b: FrequencyData): boolean => a !== undefined && a[0] === b[0] && a[1] === b[1] && a[2] === b[2];

/**
 * MIDI Tuning Standard, real-time single note tuning change, on one channel. The 128 keys are
 * tuning slots: a note goes to the slot of its nearest key, retuned first if needed; a slot is
 * retuned only when nothing sounds on it and its release guard has passed, so when G♯ and A♭ of
 * one key must sound together the second takes the nearest free slot instead.
 */
export class MtsNoteOutput extends SingleChannelOutput implements OutputStrategy {
  readonly mode = 'mts-note';
  readonly counters: OutputCounters = { retunes: 0, steals: 0 };
  private readonly slots: Slot[] = Array.from({ length: 128 }, () => ({ data: undefined, sounding: 0, lastEnd: -Infinity, newestStart: -Infinity }));

  constructor(private readonly setup: MtsNoteOutputSetup) {
    super(setup.channel);
  }

  start(emit: Emit): void {
    this.startChannel(emit, this.setup.wheelRange, this.setup.sendBendRange);
    for (const slot of this.slots) slot.data = undefined; // the synth's tuning is unknown until we send it
  }

  private isFree(slot: Slot, time: number): boolean {
    return slot.sounding === 0 && time - slot.lastEnd >= this.setup.releaseGuardMs;
  }

  /** The slot to use: the natural one if tuned or free, else the nearest tuned or free one, else steal the natural one. */
  private choose(natural: number, data: FrequencyData, time: number): { key: number; steal: boolean } {
    const naturalSlot = this.slots[natural];
    if (naturalSlot && (sameData(naturalSlot.data, data) || this.isFree(naturalSlot, time))) return { key: natural, steal: false };
    let free: number | undefined;
    for (let distance = 1; distance < 128; distance++) {
      for (const key of [natural - distance, natural + distance]) {
        const slot = this.slots[key];
        if (!slot) continue;
        if (sameData(slot.data, data)) return { key, steal: false };
        if (free === undefined && this.isFree(slot, time)) free = key;
      }
      if (free !== undefined) return { key: free, steal: false };
    }
    return { key: natural, steal: true };
  }

  place(note: TunedNote, time: number, context: PlaceContext): Placement | undefined {
    if (note.nearestKey < 0 || note.nearestKey > 127) return undefined;
    const data = encodeFrequency(note.hz, this.setup.synthA4);
    const { key, steal } = this.choose(note.nearestKey, data, time);
    const slot = this.slots[key];
    if (!slot) return undefined;
    if (steal) {
      context.steal((p) => p.channel === this.setup.channel && p.key === key);
      context.emit(noteOff(this.setup.channel, key));
      slot.sounding = 0;
      this.counters.steals++;
    }
    if (!sameData(slot.data, data)) {
      slot.data = data;
      this.counters.retunes++;
      context.emit(singleNoteTuning(this.setup.device, this.setup.program, [{ key, data }]));
    }
    slot.sounding++;
    slot.newestStart = time;
    this.used = true;
    return { channel: this.setup.channel, key };
  }

  voiceEnded(placement: Placement, time: number): void {
    const slot = this.slots[placement.key];
    if (!slot || slot.sounding === 0) return;
    slot.sounding--;
    if (slot.sounding === 0) slot.lastEnd = time;
  }

  unitOf(placement: Placement): number {
    return placement.key;
  }

  retune(placement: Placement, note: TunedNote, context: PlaceContext): boolean {
    const slot = this.slots[placement.key];
    if (!slot) return false;
    const data = encodeFrequency(note.hz, this.setup.synthA4); // MTS tunes a slot to any frequency
    if (!sameData(slot.data, data)) {
      slot.data = data;
      this.counters.retunes++;
      context.emit(singleNoteTuning(this.setup.device, this.setup.program, [{ key: placement.key, data }]));
    }
    return true;
  }

  override panic(emit: Emit): void {
    super.panic(emit);
    for (const slot of this.slots) {
      slot.sounding = 0;
      slot.lastEnd = -Infinity;
    }
  }
}
