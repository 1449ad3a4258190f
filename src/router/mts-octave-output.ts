import { quantiseScaleOctave, scaleOctaveLimits, scaleOctaveTuning, type ScaleOctaveForm } from '../midi/mts.js';
import { chromaOf, keyOf, rangeClasses, type KeyboardWindow } from '../pitch/index.js';
import { mod } from '../util/errors.js';
import type { InPlaceRetuning, OutputContext, OutputModeEntry, OutputStrategy, Placement } from './output.js';
import type { PitchTable, TunedNote } from './pitch-table.js';
import { SingleChannelOutput } from './single-channel-output.js';

export interface MtsOctaveOutputSetup {
  readonly channel: number;
  readonly device: number;
  readonly form: ScaleOctaveForm;
  readonly wheelRange: number;
  readonly sendBendRange: boolean;
}

/**
 * MIDI Tuning Standard scale/octave tuning: one offset per key class, repeated in every octave,
 * for synths that take only 12-class tuning. The table follows the spellings in use: when a new
 * note needs its key class retuned (A♭ where G♯ was), the whole table is sent again before it.
 * Limit: a held note of that key class moves with it; the offsets are limited to −64…+63 cents
 * (1-byte form) or ±100 cents (2-byte form), so all keys are moved by one common shift chosen
 * from the reference pitch of the table it is made with.
 */
export class MtsOctaveOutput extends SingleChannelOutput implements OutputStrategy {
  readonly inPlace: InPlaceRetuning;
  private readonly offsets: number[] = new Array<number>(12).fill(0);
  private readonly shift: number;

  constructor(
    private readonly setup: MtsOctaveOutputSetup,
    table: PitchTable,
    private readonly window: KeyboardWindow,
  ) {
    super(setup.channel, setup.wheelRange, setup.sendBendRange);
    const classes = rangeClasses(window);
    const mean = classes.reduce((sum, pc) => sum + table.offsetOf(pc).cents, 0) / classes.length;
    this.shift = Math.round(mean / 100);
    this.inPlace = { unitOf: (p) => mod(p.key, 12), retune: (p, note, context) => this.retune(p, note, context) };
  }

  private send(context: OutputContext): void {
    context.retuned();
    context.emit(scaleOctaveTuning(this.setup.device, [this.setup.channel], this.offsets, this.setup.form));
  }

  /** Offset the key class needs for a pitch class with `cents` from its own key. */
  private fit(cents: number): { value: number; clamped: boolean } {
    const wanted = cents - 100 * this.shift;
    const { lowest, highest } = scaleOctaveLimits(this.setup.form);
    return { value: quantiseScaleOctave(Math.max(lowest, Math.min(highest, wanted)), this.setup.form), clamped: wanted < lowest || wanted > highest };
  }

  /**
   * The channel's set-up and the whole table, in the tuning in force (not the one the output was
   * made with: after a `set-tuning`, a synth that comes back gets the new tuning on every key class).
   */
  start(context: OutputContext): void {
    this.startChannel(context);
    const table = context.tableInForce();
    for (const pc of rangeClasses(this.window)) this.offsets[mod(chromaOf(pc) + this.shift, 12)] = this.fit(table.offsetOf(pc).cents).value;
    this.send(context);
  }

  place(note: TunedNote, _time: number, context: OutputContext): Placement | undefined {
    const key = keyOf(note.pitch) + this.shift;
    if (key < 0 || key > 127) return undefined;
    const { value, clamped } = this.fit(note.offset.cents);
    if (clamped) context.outOfRange(note, note.offset.cents - 100 * this.shift);
    this.setOffset(mod(key, 12), value, context);
    return { channel: this.setup.channel, key };
  }

  private setOffset(keyClass: number, value: number, context: OutputContext): void {
    if (this.offsets[keyClass] === value) return;
    this.offsets[keyClass] = value;
    this.send(context);
  }

  voiceEnded(): void {}

  private retune(placement: Placement, note: TunedNote, context: OutputContext): boolean {
    if (placement.key !== keyOf(note.pitch) + this.shift) return false;
    const { value, clamped } = this.fit(note.offset.cents);
    if (clamped) return false;
    this.setOffset(mod(placement.key, 12), value, context);
    return true;
  }
}

export const mtsOctaveMode: OutputModeEntry = {
  summary: 'MIDI Tuning Standard scale/octave tuning on one channel (12 key classes)',
  channels: 'one',
  defaultChannels: [0],
  settings: ['mtsDevice', 'octaveForm'],
  retuneLabel: 'MTS messages',
  create: (request, table) =>
    new MtsOctaveOutput(
      { channel: request.channels[0] ?? 0, device: request.mtsDevice, form: request.octaveForm, wheelRange: request.wheelRange, sendBendRange: request.sendBendRange },
      table,
      request.window,
    ),
};
