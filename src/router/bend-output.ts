import { bendSensitivity, CC, controlChange, mpeConfiguration, pitchBend } from '../midi/bytes.js';
import { BEND_CENTRE, bendToCents, centsToBend } from '../midi/pitch-bend.js';
import { keyOf } from '../pitch/index.js';
import { UserError } from '../util/errors.js';
import type { Emit, InPlaceRetuning, OutputContext, OutputModeEntry, OutputStrategy, Placement } from './output.js';
import type { TunedNote } from './pitch-table.js';

export type BendLayout = 'mpe' | 'multi';

/** The bend ranges an MPE Configuration Message sets: members ±48, the master ±2 semitones (RP-053). */
export const MPE_MEMBER_RANGE = 48;
export const MPE_MASTER_RANGE = 2;

/** `mpe`: zone-wide messages and the wheel go to the master channel; `multi`: to every member. */
export type BendZone = { readonly layout: 'mpe'; readonly master: number } | { readonly layout: 'multi' };

export interface BendOutputSetup {
  /** Member channels, 0…15, in the order given. */
  readonly channels: readonly number[];
  readonly zone: BendZone;
  /** Bend range of the member channels in semitones. */
  readonly bendRange: number;
  /** Send RPN 0 (and the MPE zone message) at start, or trust the synth's own setting. */
  readonly sendBendRange: boolean;
  readonly releaseGuardMs: number;
  /** The player's wheel range at start, also set as the MPE master channel's bend range. */
  readonly wheelRange: number;
}

interface ChannelState {
  readonly channel: number;
  /** The bend value of the tuning alone (wheel excluded), undefined until first used: channels are shared per value. */
  tuningBend: number | undefined;
  /** The bend value last sent (tuning plus wheel in the multi layout), undefined while the synth's is unknown. */
  sentBend: number | undefined;
  /** True when the wheel moved while the channel was idle: send its bend before the next note. */
  stale: boolean;
  sounding: number;
  lastEnd: number;
  lastUse: number;
  newestStart: number;
  /** It has carried a note since the start: panic centres it. */
  used: boolean;
}

/** The MPE master channel for a set of members: 1 below a zone starting at 2, 16 above one ending at 15. */
export function mpeMaster(channels: readonly number[]): number {
  const sorted = [...channels].sort((a, b) => a - b);
  const contiguous = sorted.every((c, i) => i === 0 || c === (sorted[i - 1] ?? -2) + 1);
  if (contiguous && sorted[0] === 1) return 0;
  if (contiguous && sorted[sorted.length - 1] === 14) return 15;
  throw new UserError('the MPE layout needs member channels 2…N (lower zone, master 1) or N…15 (upper zone, master 16); use --layout multi for any other set', 2);
}

/**
 * Per-channel pitch bend. Notes that need the same bend share a channel, so every octave of a
 * spelled pitch class (and every spelling with the same offset) sounds on one channel and
 * polyphony is unlimited. A channel's tuning never changes while a note sounds on it or within
 * the release guard after its last note ends; among free channels the least recently used is
 * taken. When none is free the channel whose newest note started longest ago is stolen: its notes
 * get note-offs and an All Sound Off on that channel, so the retune is never heard. A channel's
 * bend is sent when it is first used, and panic centres only the channels that carried notes.
 */
export class BendOutput implements OutputStrategy {
  readonly zoneChannels: readonly number[];
  readonly allChannels: readonly number[];
  readonly inPlace: InPlaceRetuning;
  private readonly states: ChannelState[];
  private readonly byChannel: Array<ChannelState | undefined> = [];
  private wheelCents = 0;
  /** The MPE master channel's bend range as last sent. */
  private masterRange: number;

  constructor(private readonly setup: BendOutputSetup) {
    this.states = setup.channels.map((channel) => ({
      channel,
      tuningBend: undefined,
      sentBend: undefined,
      stale: false,
      sounding: 0,
      lastEnd: -Infinity,
      lastUse: -Infinity,
      newestStart: -Infinity,
      used: false,
    }));
    for (const s of this.states) this.byChannel[s.channel] = s;
    const zone = setup.zone;
    this.zoneChannels = zone.layout === 'mpe' ? [zone.master] : [...setup.channels];
    this.allChannels = zone.layout === 'mpe' ? [zone.master, ...setup.channels] : [...setup.channels];
    this.masterRange = setup.wheelRange;
    this.inPlace = { unitOf: (p) => p.channel, retune: (p, note, context) => this.retune(p, note, context) };
  }

  start(context: OutputContext): void {
    const { zone, channels, bendRange, sendBendRange, wheelRange } = this.setup;
    const emit = context.emit;
    if (sendBendRange) {
      // MPE: the zone message first. Receiving it sets member ranges to ±48 and the master's to ±2
      // (RP-053), so RPN 0 follows only where the ranges wanted differ from those.
      const mpe = zone.layout === 'mpe';
      if (mpe) for (const m of mpeConfiguration(zone.master, channels.length)) emit(m);
      if (mpe && wheelRange !== MPE_MASTER_RANGE) for (const m of bendSensitivity(zone.master, wheelRange)) emit(m);
      if (!mpe || bendRange !== MPE_MEMBER_RANGE) for (const c of channels) for (const m of bendSensitivity(c, bendRange)) emit(m);
    }
    this.masterRange = wheelRange;
    if (zone.layout === 'mpe') emit(pitchBend(zone.master, BEND_CENTRE));
    for (const s of this.states) {
      s.sentBend = undefined; // the synth's bends are unknown until each channel is used
      s.tuningBend = undefined;
      s.stale = false;
    }
  }

  private isFree(s: ChannelState, time: number): boolean {
    return s.sounding === 0 && time - s.lastEnd >= this.setup.releaseGuardMs;
  }

  private combined(tuningBend: number): { value: number; clamped: boolean } {
    if (this.setup.zone.layout !== 'multi') return { value: tuningBend, clamped: false };
    return centsToBend(bendToCents(tuningBend, this.setup.bendRange) + this.wheelCents, this.setup.bendRange);
  }

  private send(s: ChannelState, context: OutputContext): void {
    s.stale = false;
    if (s.tuningBend === undefined) return;
    const { value } = this.combined(s.tuningBend);
    if (value === s.sentBend) return;
    s.sentBend = value;
    context.retuned();
    context.emit(pitchBend(s.channel, value));
  }

  place(note: TunedNote, time: number, context: OutputContext): Placement | undefined {
    if (note.nearestKey < 0 || note.nearestKey > 127) return undefined;
    const target = centsToBend(note.offset.residual, this.setup.bendRange);
    if (target.clamped || this.combined(target.value).clamped) {
      context.outOfRange(note, note.offset.residual + (this.setup.zone.layout === 'multi' ? this.wheelCents : 0));
    }
    let chosen: ChannelState | undefined;
    for (const s of this.states) {
      if (s.tuningBend === target.value) {
        chosen = s;
        break;
      }
    }
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
      }
      chosen = best;
      chosen.tuningBend = target.value;
      this.send(chosen, context);
    } else if (chosen.stale || chosen.sentBend === undefined) {
      this.send(chosen, context);
    }
    chosen.sounding++;
    chosen.used = true;
    chosen.lastUse = time;
    chosen.newestStart = time;
    return { channel: chosen.channel, key: note.nearestKey };
  }

  voiceEnded(placement: Placement, time: number): void {
    const s = this.byChannel[placement.channel];
    if (!s || s.sounding === 0) return;
    s.sounding--;
    if (s.sounding === 0) s.lastEnd = time;
  }

  private retune(placement: Placement, note: TunedNote, context: OutputContext): boolean {
    const s = this.byChannel[placement.channel];
    const needed = centsToBend(note.offset.cents - 100 * (placement.key - keyOf(note.pitch)), this.setup.bendRange);
    if (!s || needed.clamped) return false;
    s.tuningBend = needed.value;
    this.send(s, context);
    return true;
  }

  wheel(value: number, rangeSemitones: number, time: number, context: OutputContext): void {
    const zone = this.setup.zone;
    if (zone.layout === 'mpe') {
      // The MPE master channel's bend applies to the whole zone; its range follows the keyboard's.
      this.masterRange = sendWheel(zone.master, value, rangeSemitones, this.setup.sendBendRange, this.setup.wheelRange, this.masterRange, context.emit);
      return;
    }
    this.wheelCents = bendToCents(value, rangeSemitones);
    for (const s of this.states) {
      if (s.sounding > 0 || time - s.lastEnd < this.setup.releaseGuardMs) this.send(s, context);
      else s.stale = true;
    }
  }

  panic(context: OutputContext, time: number): void {
    this.wheelCents = 0;
    const zone = this.setup.zone;
    if (zone.layout === 'mpe') context.emit(pitchBend(zone.master, BEND_CENTRE));
    for (const s of this.states) {
      if (s.used || (s.sentBend !== undefined && s.sentBend !== BEND_CENTRE)) {
        context.emit(pitchBend(s.channel, BEND_CENTRE));
        s.sentBend = BEND_CENTRE;
        s.tuningBend = BEND_CENTRE;
      }
      s.stale = false;
      if (s.sounding > 0) s.lastEnd = time; // its notes' release tails ring on: the guard starts now
      s.sounding = 0;
    }
  }
}

/**
 * Sends the keyboard's wheel to a channel that carries it as it is (the MPE master, a one-channel
 * output). When the keyboard's range changed, the channel's range is sent again first (RPN 0);
 * when the synth's range is set by hand, the value is rescaled to the configured range instead.
 * Returns the channel's range from now on.
 */
export function sendWheel(channel: number, value: number, range: number, sendBendRange: boolean, configuredRange: number, sentRange: number, emit: Emit): number {
  if (!sendBendRange) {
    emit(pitchBend(channel, centsToBend(bendToCents(value, range), configuredRange).value));
    return sentRange;
  }
  if (range !== sentRange) for (const m of bendSensitivity(channel, range)) emit(m);
  emit(pitchBend(channel, value));
  return range;
}

export const bendMode: OutputModeEntry = {
  summary: 'per-channel pitch bend: an MPE zone or independent multitimbral channels',
  channels: 'list',
  defaultChannels: Array.from({ length: 15 }, (_, i) => i + 1), // 2–16
  settings: ['layout', 'bendRange'],
  retuneLabel: 'bend messages',
  create(request) {
    return new BendOutput({
      channels: request.channels,
      zone: request.layout === 'mpe' ? { layout: 'mpe', master: mpeMaster(request.channels) } : { layout: 'multi' },
      bendRange: request.bendRange,
      sendBendRange: request.sendBendRange,
      releaseGuardMs: request.releaseGuardMs,
      wheelRange: request.wheelRange,
    });
  },
};
