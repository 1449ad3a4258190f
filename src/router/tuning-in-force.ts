import { isAdaptive, type Reference, type Tuning } from '../tuning/index.js';
import { AdaptivePitches } from './adaptive-pitches.js';
import { PitchTable } from './pitch-table.js';
import { TableChoice } from './table-choice.js';

/** A tuning to change to while playing (a `set-tuning` control, a programme's next piece). */
export interface TuningChange {
  /** The preset id or file name, for displays and logs. */
  readonly id: string;
  /** The tuning's full name. */
  readonly name: string;
  readonly tuning: Tuning;
  /** The new reference pitch; undefined keeps the one in force. */
  readonly reference?: Reference | undefined;
  /** The synth's own A4 from now on (a synth retuned between pieces); undefined keeps it. */
  readonly synthA4?: number | undefined;
}

/**
 * The tuning and reference new notes take, and the tables made from them. Changing them touches
 * only what new notes are tuned with: a sounding note keeps the pitch it was placed with (the
 * output owns its channel or slot, and retunes that only when it is free and its release guard has
 * passed), so notes already sounding finish in the old tuning.
 *
 * Adaptive tunings: each change makes a fresh tuner, which does not know the notes still sounding
 * from before (they are in another tuning, so new chords are not fitted to them); their ends are
 * ignored by it.
 */
export class TuningInForce {
  private current: TableChoice;
  private tuner: AdaptivePitches | undefined;
  private named: { readonly id: string; readonly name: string };

  constructor(
    table: PitchTable,
    about: { readonly id: string; readonly name: string } = { id: 'tuning', name: 'tuning' },
  ) {
    this.current = new TableChoice(table);
    this.tuner = TuningInForce.tunerOf(table);
    this.named = about;
  }

  private static tunerOf(table: PitchTable): AdaptivePitches | undefined {
    return isAdaptive(table.tuning) ? new AdaptivePitches(table.tuning, table.reference, table.synthA4) : undefined;
  }

  get tuning(): Tuning {
    return this.current.base.tuning;
  }

  get reference(): Reference {
    return this.current.base.reference;
  }

  get id(): string {
    return this.named.id;
  }

  get name(): string {
    return this.named.name;
  }

  /** The table choice for new notes (12-ET while passing, a just table moved to the tonic). */
  get tables(): TableChoice {
    return this.current;
  }

  /** Pitches that follow the harmony, when the tuning is adaptive. */
  get adaptive(): AdaptivePitches | undefined {
    return this.tuner;
  }

  /** New notes from now on take `change`; the reference stays when the change gives none. */
  change(change: TuningChange): void {
    const base = this.current.base;
    const table = new PitchTable(change.tuning, change.reference ?? base.reference, change.synthA4 ?? base.synthA4);
    this.current = new TableChoice(table);
    this.tuner = TuningInForce.tunerOf(table);
    this.named = { id: change.id, name: change.name };
  }
}
