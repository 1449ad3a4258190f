import { keyOf, spelledPitch, type PitchClass, type SpelledPitch } from '../pitch/index.js';
import { frequency, type Reference, type Tuning } from '../tuning/index.js';

/** How a spelled pitch class sits against the synth's own 12-ET (octave-independent). */
export interface ClassOffset {
  /** Cents from the synth's 12-ET pitch of the spelling's own key. */
  readonly cents: number;
  /** Keys to move so the leftover bend is within ±50 cents. */
  readonly keyShift: number;
  /** `cents − 100 · keyShift`: what pitch bend or MTS must add to the shifted key. */
  readonly residual: number;
}

/** A spelled pitch made ready for output: where it sounds and how far it is from that key. */
export interface TunedNote {
  readonly pitch: SpelledPitch;
  readonly hz: number;
  /** The nearest 12-ET key of the synth: the spelling's key plus `keyShift`. */
  readonly nearestKey: number;
  readonly offset: ClassOffset;
  /** Cents from the 12-ET pitch of the same key at the same reference (what a player reads). */
  readonly etCents: number;
}

/**
 * Caches each spelled pitch class's offset for one tuning, reference and synth calibration, so the
 * hot path does a map look-up instead of exact arithmetic.
 */
export class PitchTable {
  private readonly cache = new Map<number, ClassOffset>();
  /** Tuned notes by spelled pitch (`fifths · 1024 + octave`), so the hot path allocates nothing. */
  private readonly notes = new Map<number, TunedNote>();
  private readonly referenceHz: number;
  private readonly referenceKey: number;

  constructor(
    readonly tuning: Tuning,
    readonly reference: Reference,
    /** The synth's own A4 in Hz (440 unless the synth is tuned elsewhere). */
    readonly synthA4: number,
  ) {
    this.referenceHz = reference.hz.valueOf();
    this.referenceKey = keyOf(reference.pitch);
  }

  offsetOf(pc: PitchClass): ClassOffset {
    let offset = this.cache.get(pc.fifths);
    if (offset === undefined) {
      const probe = spelledPitch(pc, 4);
      const hz = frequency(this.tuning, this.reference, probe);
      const cents = 1200 * Math.log2(hz / (this.synthA4 * 2 ** ((keyOf(probe) - 69) / 12)));
      const keyShift = Math.round(cents / 100);
      offset = { cents, keyShift, residual: cents - 100 * keyShift };
      this.cache.set(pc.fifths, offset);
    }
    return offset;
  }

  tune(pitch: SpelledPitch): TunedNote {
    const id = pitch.fifths * 1024 + pitch.octave;
    let note = this.notes.get(id);
    if (note === undefined) {
      const offset = this.offsetOf(pitch);
      const key = keyOf(pitch);
      const hz = this.synthA4 * 2 ** ((key - 69 + offset.cents / 100) / 12);
      const et = this.referenceHz * 2 ** ((key - this.referenceKey) / 12);
      note = { pitch, hz, nearestKey: key + offset.keyShift, offset, etCents: 1200 * Math.log2(hz / et) };
      if (this.notes.size < 65_536) this.notes.set(id, note);
    }
    return note;
  }
}
