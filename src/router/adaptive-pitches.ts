import { keyOf, type PitchClass, type SpelledPitch } from '../pitch/index.js';
import { AdaptiveTuner, synthOffset } from '../tuning/adaptive/index.js';
import type { AdaptiveJustTuning, Reference } from '../tuning/index.js';
import type { NoteId } from '../midi/note-id.js';
import type { TunedNote } from './pitch-table.js';

/** A note tuned by the harmony: what the outputs need, and how it sits against the fixed table. */
export interface AdaptedTunedNote extends TunedNote {
  /** Cents from the same spelling in the fixed just table of the key. */
  readonly fromTable: number;
  /** Some consonance with what sounds could not be made pure. */
  readonly compromise: boolean;
}

/**
 * Pitches for `just-adaptive`: each chord is placed by the adaptive tuner against the notes
 * sounding (which never move) and turned into the shape the outputs place (nearest key and
 * residual against the synth's 12-ET). The tuner hears a voice end when it really stops sounding.
 */
export class AdaptivePitches {
  private readonly tuner: AdaptiveTuner;
  private tonic: PitchClass | undefined;

  constructor(
    tuning: AdaptiveJustTuning,
    private readonly reference: Reference,
    private readonly synthA4: number,
  ) {
    this.tuner = new AdaptiveTuner({ table: tuning, reference, settings: tuning.settings });
  }

  /** The declared key anchors the tuner's level (undefined: the table's own tonic). */
  setTonic(tonic: PitchClass | undefined): void {
    if (tonic?.fifths === this.tonic?.fifths) return;
    this.tonic = tonic;
    this.tuner.setTonic(tonic);
  }

  tuneChord(time: number, notes: ReadonlyArray<{ readonly id: NoteId; readonly pitch: SpelledPitch }>): AdaptedTunedNote[] {
    const et = this.reference.hz.valueOf();
    const etKey = keyOf(this.reference.pitch);
    return this.tuner.chordOn(time, notes).map((a, i) => {
      const pitch = notes[i]!.pitch;
      const offset = synthOffset(pitch, a.hz, this.synthA4);
      const etHz = et * 2 ** ((keyOf(pitch) - etKey) / 12);
      return { pitch, hz: a.hz, nearestKey: keyOf(pitch) + offset.keyShift, offset, etCents: 1200 * Math.log2(a.hz / etHz), fromTable: a.fromTable, compromise: a.compromise };
    });
  }

  ended(time: number, id: NoteId): void {
    this.tuner.noteOff(time, id);
  }

  reset(): void {
    this.tuner.reset();
  }
}
