import { keyOf, type SpelledPitch } from '../../pitch/index.js';

/**
 * Where an adapted note sits against the synth's own 12-ET, in the shape the outputs use for a
 * fixed tuning (`ClassOffset` of the pitch table): cents from the 12-ET pitch of the spelling's
 * key, the keys to move so the rest is within ±50 cents, and that rest for pitch bend or MTS.
 */
export function synthOffset(pitch: SpelledPitch, hz: number, synthA4: number): { cents: number; keyShift: number; residual: number } {
  const cents = 1200 * Math.log2(hz / (synthA4 * 2 ** ((keyOf(pitch) - 69) / 12)));
  const keyShift = Math.round(cents / 100);
  return { cents, keyShift, residual: cents - 100 * keyShift };
}
