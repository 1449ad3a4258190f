import { bendSensitivity, CC, controlChange, mpeConfiguration, pitchBend } from '../midi/bytes.js';
import { BEND_CENTRE, bendToCents, centsToBend } from '../midi/pitch-bend.js';
import { keyOf } from '../pitch/index.js';
import type { Emit, OutputCounters, OutputStrategy, PlaceContext, Placement } from './output.js';
import type { TunedNote } from './pitch-table.js';

export type BendLayout = 'mpe' | 'multi';

export interface BendOutputSetup {
  /** Member channels, 0…15, in the order given. */
  readonly channels: readonly number[];
  /** `mpe`: zone-wide messages and the wheel go to the master channel; `multi`: to every member. */
  readonly layout: BendLayout;
  /** The MPE master channel (0 for the lower zone, 15 for the upper). */
  readonly masterChannel: number;
  /** Bend range of the member channels in semitones. */
  readonly bendRange: number;
  /** Send RPN 0 (and the MPE zone message) at start, or trust the synth's own setting. */
  readonly sendBendRange: boolean;
  readonly releaseGuardMs: number;
  /** The player's wheel range, also set as the MPE master channel's bend range. */
  readonly wheelRange: number;
}

interface ChannelState {
  readonly channel: number;
  /** The bend value of the tuning alone (wheel excluded): channels are shared per value. */
  tuningBend: number;
  /** The bend value last sent (tuning plus wheel in the multi layout). */
  sentBend: number;
  /** True when the wheel moved while the channel was idle: send its bend before the next note. */
  stale: boolean;
  sounding: number;
  lastEnd: number;
  lastUse: number;
  newestStart: number;
  used: boolean;
}

/**
 * Per-channel pitch bend. Notes that need the same bend share a channel, so every octave of a
 * spelled pitch class (and every spelling with the same offset) sounds on one channel and
 * polyphony is unlimited. A channel's tuning never changes while a note sounds on it or within
 * the release guard after its last note ends; among free channels the least recently used is
 * taken. When none is free the channel whose newest note started longest ago is stolen: its notes
 * get note-offs and an All Sound Off on that channel, so the retune is never heard.
 */
export class BendOutput implements OutputStrategy {
  readonly mode = 'bend';
  readonly counters: OutputCounters = { retunes: 0, steals: 0 };
  readonly zoneChannels: readonly number[];
  readonly allChannels: readonly number[];
  private readonly states: ChannelState[];
  private wheelCents = 0;

  constructor(private readonly setup: BendOutputSetup) {
    this.states = setup.channels.map((channel) => ({
      channel,
      tuningBend: BEND_CENTRE,
      sentBend: BEND_CENTRE,
      stale: false,
      sounding: 0,
      lastEnd: -Infinity,
      lastUse: -Infinity,
      newestStart: -Infinity,
      used: false,
    }));
    this.zoneChannels = setup.layout === 'mpe' ? [setup.masterChannel] : [...setup.channels];
    this.allChannels = setup.layout === 'mpe' ? [setup.masterChannel, ...setup.channels] : [...setup.channels];
  }

  start(emit: Emit): void {
    const { layout, masterChannel, channels, bendRange, sendBendRange, wheelRange } = this.setup;
    if (sendBendRange) {
      if (layout === 'mpe') {
        // The zone message first: receiving it resets member ranges to ±48 and the master's to ±2 (RP-053).
        for (const m of mpeConfiguration(masterChannel, channels.length)) emit(m);
        for (const m of bendSensitivity(masterChannel, wheelRange)) emit(m);
      }
      for (const c of channels) for (const m of bendSensitivity(c, bendRange)) emit(m);
    }
    if (layout === 'mpe') emit(pitchBend(masterChannel, BEND_CENTRE));
    for (const s of this.states) {
      s.sentBend = BEND_CENTRE;
      s.tuningBend = BEND_CENTRE;
      emit(pitchBend(s.channel, BEND_CENTRE));
    }
  }

  private isFree(s: ChannelState, time: number): boolean {
    return s.sounding === 0 && time - s.lastEnd >= this.setup.releaseGuardMs;
  }

  private combined(tuningBend: number): { value: number; clamped: boolean } {
    const tuningCents = bendToCents(tuningBend, this.setup.bendRange);
    return this.setup.layout === 'multi' ? centsToBend(tuningCents + this.wheelCents, this.setup.bendRange) : { value: tuningBend, clamped: false };
  }

  private send(s: ChannelState, emit: Emit): void {
    const { value } = this.combined(s.tuningBend);
    s.stale = false;
    if (value === s.sentBend) return;
    s.sentBend = value;
    this.counters.retunes++;
    emit(pitchBend(s.channel, value));
  }

  place(note: TunedNote, time: number, context: PlaceContext): Placement | undefined {
    if (note.nearestKey < 0 || note.nearestKey > 127) return undefined;
    const target = centsToBend(note.offset.residual, this.setup.bendRange);
    if (target.clamped || this.combined(target.value).clamped) {
      context.outOfRange(note, note.offset.residual + (this.setup.layout === 'multi' ? this.wheelCents : 0));
    }
    let chosen = this.states.find((s) => s.tuningBend === target.value);
    if (chosen === undefined) {
      let best: ChannelState | undefined;
      for (const s of this.states) if (this.isFree(s, time) && (best === undefined || s.lastUse < best.lastUse)) best = s;
      if (best === undefined) {
        for (const s of this.states) if (best === undefined || s.newestStart < best.newestStart) best = s;
        if (best === undefined) return undefined;
        const victim = best.channel;
        context.steal((p) => p.channel === victim);
        context.emit(controlChange(victim, CC.allSoundOff, 0)); // cut sustained notes and release tails before the retune
        best.sounding = 0;
        best.lastEnd = time;
        this.counters.steals++;
      }
      chosen = best;
      chosen.tuningBend = target.value;
      this.send(chosen, context.emit);
    } else if (chosen.stale) {
      this.send(chosen, context.emit);
    }
    chosen.sounding++;
    chosen.used = true;
    chosen.lastUse = time;
    chosen.newestStart = time;
    return { channel: chosen.channel, key: note.nearestKey };
  }

  voiceEnded(placement: Placement, time: number): void {
    const s = this.states.find((x) => x.channel === placement.channel);
    if (!s || s.sounding === 0) return;
    s.sounding--;
    if (s.sounding === 0) s.lastEnd = time;
  }

  unitOf(placement: Placement): number {
    return placement.channel;
  }

  retune(placement: Placement, note: TunedNote, context: PlaceContext): boolean {
    const s = this.states.find((x) => x.channel === placement.channel);
    const needed = centsToBend(note.offset.cents - 100 * (placement.key - keyOf(note.pitch)), this.setup.bendRange);
    if (!s || needed.clamped) return false;
    s.tuningBend = needed.value;
    this.send(s, context.emit);
    return true;
  }

  wheel(value: number, wheelRangeSemitones: number, time: number, emit: Emit): void {
    if (this.setup.layout === 'mpe') {
      // The MPE master channel's bend applies to the whole zone; its range was set to the wheel's.
      emit(pitchBend(this.setup.masterChannel, value));
      return;
    }
    this.wheelCents = bendToCents(value, wheelRangeSemitones);
    for (const s of this.states) {
      if (s.sounding > 0 || time - s.lastEnd < this.setup.releaseGuardMs) this.send(s, emit);
      else s.stale = true;
    }
  }

  reassert(emit: Emit): void {
    if (this.setup.layout === 'mpe') emit(pitchBend(this.setup.masterChannel, BEND_CENTRE));
    this.wheelCents = 0;
    for (const s of this.states) {
      s.sentBend = -1; // unknown after a reset: send again
      this.send(s, emit);
    }
  }

  panic(emit: Emit): void {
    this.wheelCents = 0;
    for (const channel of this.allChannels) emit(pitchBend(channel, BEND_CENTRE));
    for (const s of this.states) {
      s.tuningBend = BEND_CENTRE;
      s.sentBend = BEND_CENTRE;
      s.stale = false;
      s.sounding = 0;
      s.lastEnd = -Infinity;
    }
  }

  usedChannels(): number[] {
    return this.states.filter((s) => s.used).map((s) => s.channel);
  }
}
