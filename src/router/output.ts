import type { TunedNote } from './pitch-table.js';

/** Where a voice sounds on the synth. */
export interface Placement {
  readonly channel: number;
  readonly key: number;
}

export type Emit = (data: number[]) => void;

/** What an output strategy may ask of the router while placing a note. */
export interface PlaceContext {
  readonly emit: Emit;
  /**
   * Steals: ends at once every voice the router has at placements matching `which` (note-offs for
   * keys still down; the player's later key-up sends nothing). The output silences what rings on.
   */
  steal(which: (p: Placement) => boolean): void;
  /** Reports a tuning the output could not reach exactly (bend or offset clamped). */
  outOfRange(note: TunedNote, neededCents: number): void;
}

export interface OutputCounters {
  /** Tuning messages sent (pitch bends for tuning, MTS messages). */
  retunes: number;
  steals: number;
}

/**
 * One way of making a synth sound tuned notes (per-channel pitch bend, MTS, pass-through).
 * The router owns notes, pedals and keys; an output owns channels, slots and their tuning.
 */
export interface OutputStrategy {
  readonly mode: string;
  readonly counters: OutputCounters;
  /** Channels that receive zone-wide messages: controllers, channel pressure, programs. */
  readonly zoneChannels: readonly number[];
  /** Every channel this output may use (panic covers them all). */
  readonly allChannels: readonly number[];
  /** Set-up messages: bend ranges, zone configuration, centred bends. */
  start(emit: Emit): void;
  /** Chooses where a new note sounds, sending any retuning it needs first; undefined if it cannot sound. */
  place(note: TunedNote, time: number, context: PlaceContext): Placement | undefined;
  /** A voice placed earlier no longer sounds (its key and any pedal holding it are up). */
  voiceEnded(placement: Placement, time: number): void;
  /** The tuning unit a placement belongs to (a bend channel, an MTS slot, a key class); −1 when it has none. */
  unitOf(placement: Placement): number;
  /** Retunes the unit of `placement` in place to `note`, sounding notes included; false if it cannot. */
  retune(placement: Placement, note: TunedNote, context: PlaceContext): boolean;
  /** The player's pitch wheel moved: 14-bit value, and the range it spans in semitones. */
  wheel(value: number, wheelRangeSemitones: number, time: number, emit: Emit): void;
  /** Sends again whatever tuning a Reset All Controllers may have cleared. */
  reassert(emit: Emit): void;
  /** Forgets all voices and centres every bend (part of panic). */
  panic(emit: Emit): void;
  /** Channels that have carried notes since the start. */
  usedChannels(): number[];
}
