/** Converts tuning offsets to 14-bit pitch-bend values and back (MIDI 1.0: 8192 is no bend). */

export const BEND_CENTRE = 8192;
export const BEND_MAX = 16383;

export interface BendValue {
  readonly value: number;
  /** True when the offset needed more than the bend range and was clamped. */
  readonly clamped: boolean;
}

/** `8192 + cents / (100 · range) · 8192`, rounded, clamped to 0…16383. */
export function centsToBend(cents: number, rangeSemitones: number): BendValue {
  const raw = BEND_CENTRE + Math.round((cents / (100 * rangeSemitones)) * 8192);
  if (raw < 0) return { value: 0, clamped: true };
  if (raw > BEND_MAX) return { value: BEND_MAX, clamped: true };
  return { value: raw, clamped: false };
}

export function bendToCents(value: number, rangeSemitones: number): number {
  return ((value - BEND_CENTRE) / 8192) * 100 * rangeSemitones;
}

/** The size in cents of one bend step: the tuning resolution at this range. */
export function bendStepCents(rangeSemitones: number): number {
  return (100 * rangeSemitones) / 8192;
}
