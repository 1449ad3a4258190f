import type { KeyboardWindow, SpelledPitch } from '../pitch/index.js';
import type { PitchTable, TunedNote } from './pitch-table.js';

/** Where a voice sounds on the synth. */
export interface Placement {
  readonly channel: number;
  readonly key: number;
}

export type Emit = (data: number[]) => void;

/** What an output may ask of the router: send, report, and end voices it must take over. */
export interface OutputContext {
  readonly emit: Emit;
  /** Reports one tuning message sent (a pitch bend for tuning, an MTS message). */
  retuned(): void;
  /**
   * Steals: ends at once every voice the router has at placements matching `which` (note-offs for
   * keys still down; the player's later key-up sends nothing). The output silences what rings on.
   */
  steal(which: (p: Placement) => boolean): void;
  /** Reports a tuning the output could not reach exactly (bend or offset clamped). */
  outOfRange(note: TunedNote, neededCents: number): void;
  /** Whether a pedal is down: a note-off then cannot silence a note, so a steal could be heard. */
  readonly pedalDown: boolean;
  /** Says why the note being placed cannot sound (before `place` returns undefined). */
  refuse(reason: string): void;
  /**
   * The pitch table new notes take now: a `set-tuning` action or a new piece may have changed it
   * since the output was made. An output that sets up a whole tuning in `start` (mts-octave's 12
   * key classes) takes it from here, so a synth that comes back gets the tuning in force.
   */
  tableInForce(): PitchTable;
}

/**
 * Retuning in place: what respelling a sounding note may do without striking it again. A tuning
 * unit is a bend channel, an MTS slot or a key class.
 */
export interface InPlaceRetuning {
  unitOf(placement: Placement): number;
  /** Retunes the unit of `placement` to `note`, sounding notes included; false if it cannot. */
  retune(placement: Placement, note: TunedNote, context: OutputContext): boolean;
}

/**
 * One way of making a synth sound tuned notes (per-channel pitch bend, MTS, a sample set,
 * pass-through). The router owns notes, pedals and keys; an output owns channels, slots and
 * their tuning.
 */
export interface OutputStrategy {
  /** Channels that receive zone-wide messages: controllers, channel pressure, programs. */
  readonly zoneChannels: readonly number[];
  /** Every channel this output may use (panic covers them all). */
  readonly allChannels: readonly number[];
  /** Set-up messages: bend ranges, zone configuration. Sent at start and when the synth (re)appears. */
  start(context: OutputContext): void;
  /** Chooses where a new note sounds, sending any retuning it needs first; undefined if it cannot sound. */
  place(note: TunedNote, time: number, context: OutputContext): Placement | undefined;
  /** A voice placed earlier no longer sounds (its key and any pedal holding it are up). */
  voiceEnded(placement: Placement, time: number): void;
  /** The player's pitch wheel moved or its range changed: 14-bit value, range in semitones. */
  wheel(value: number, rangeSemitones: number, time: number, context: OutputContext): void;
  /** Forgets all voices and centres the bends it has used (part of panic); release tails still ring, so guards start at `time`. */
  panic(context: OutputContext, time: number): void;
  /** Optional: respelling may retune a sounding unit in place. */
  readonly inPlace?: InPlaceRetuning;
  /** Optional: the spelling this output can really sound for `pitch` (a sample set may lack one). */
  available?(pitch: SpelledPitch): SpelledPitch;
}

/** The resolved settings every output mode is built from (each mode reads what applies to it). */
export interface OutputRequest {
  /** Output channels 0…15: the member channels for `bend`, the channel for one-channel modes. */
  readonly channels: readonly number[];
  readonly layout: 'mpe' | 'multi';
  /** Member-channel bend range in semitones (the synth's setting). */
  readonly bendRange: number;
  readonly sendBendRange: boolean;
  /** The keyboard's wheel range at start, in semitones. */
  readonly wheelRange: number;
  readonly releaseGuardMs: number;
  /** The synth's own A4 in Hz. */
  readonly synthA4: number;
  readonly mtsDevice: number;
  readonly mtsProgram: number;
  readonly octaveForm: 1 | 2;
  /** For `samples`: each spelling's channel in the set (line-of-fifths position → 0…15). */
  readonly sampleLayout: ReadonlyMap<number, number> | undefined;
  /** For `samples`: the (channel · 128 + key) pairs that have a sample; undefined: every key. */
  readonly sampleKeys?: ReadonlySet<number> | undefined;
  /** The spellings in use at start (12-class outputs tune their table from it). */
  readonly window: KeyboardWindow;
}

/** A mode-specific setting, so commands can refuse one that does not apply to the chosen mode. */
export type ModeSetting = 'layout' | 'bendRange' | 'octaveForm' | 'mtsDevice' | 'mtsProgram' | 'sampleSet';

/** One output mode, declared once: the registry (output-modes.ts) lists these. */
export interface OutputModeEntry {
  /** One line for help texts and summaries. */
  readonly summary: string;
  /** How many output channels it sends notes on: a list (bend), one, or the sample set's own. */
  readonly channels: 'list' | 'one' | 'set';
  /** Default output channels 0…15. */
  readonly defaultChannels: readonly number[];
  /** Settings that apply to this mode; others are refused. */
  readonly settings: readonly ModeSetting[];
  /** What the summary calls its tuning messages. */
  readonly retuneLabel: string;
  create(request: OutputRequest, table: PitchTable): OutputStrategy;
}
