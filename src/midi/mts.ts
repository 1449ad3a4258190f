/**
 * MIDI Tuning Standard messages (MMA, MIDI Tuning Updated Specification, with the
 * Scale/Octave extensions CA-021/RP-020).
 */
import { EOX, SYSEX } from './bytes.js';

/** Frequency data `xx yy zz`: 12-ET semitone at or below, then a 14-bit fraction of 100 cents. */
export type FrequencyData = readonly [number, number, number];

/** 7F 7F 7F means "no change" in the standard, so the highest encodable value is 7F 7F 7E. */
const HIGHEST = 127 * 16384 + 16382;

/** Encodes a frequency relative to the synth's 12-ET at `a4Hz` (440 unless the synth is tuned elsewhere). */
export function encodeFrequency(hz: number, a4Hz = 440): FrequencyData {
  const units = Math.max(0, Math.min(HIGHEST, frequencyUnits(hz, a4Hz)));
  const xx = Math.floor(units / 16384);
  const fraction = units % 16384;
  return [xx, fraction >> 7, fraction & 0x7f];
}

/** A frequency in MTS units (1/16384 semitone above key 0), before clamping. */
function frequencyUnits(hz: number, a4Hz: number): number {
  return Math.round((69 + 12 * Math.log2(hz / a4Hz)) * 16384);
}

/** Cents by which a frequency lies outside what MTS frequency data can say (0 inside: key 0 … key 127 + 16382/16384). */
export function mtsOutOfRangeCents(hz: number, a4Hz = 440): number {
  const units = frequencyUnits(hz, a4Hz);
  if (units < 0) return (units / 16384) * 100;
  if (units > HIGHEST) return ((units - HIGHEST) / 16384) * 100;
  return 0;
}

export function decodeFrequency(data: FrequencyData, a4Hz = 440): number {
  const [xx, yy, zz] = data;
  return a4Hz * 2 ** ((xx + ((yy << 7) | zz) / 16384 - 69) / 12);
}

export interface NoteRetune {
  readonly key: number;
  readonly data: FrequencyData;
}

/** Real-time single note tuning change: `F0 7F dev 08 02 program count [key xx yy zz]… F7`. */
export function singleNoteTuning(device: number, program: number, changes: readonly NoteRetune[]): number[] {
  const bytes = [SYSEX, 0x7f, device & 0x7f, 0x08, 0x02, program & 0x7f, changes.length & 0x7f];
  for (const c of changes) bytes.push(c.key & 0x7f, ...c.data);
  bytes.push(EOX);
  return bytes;
}

/** The 3-byte channel mask: ff = channels 15–16 (bits 0–1), gg = 8–14, hh = 1–7 (channels 0…15 here). */
export function channelMask(channels: readonly number[]): [number, number, number] {
  let ff = 0;
  let gg = 0;
  let hh = 0;
  for (const c of channels) {
    if (c >= 14) ff |= 1 << (c - 14);
    else if (c >= 7) gg |= 1 << (c - 7);
    else if (c >= 0) hh |= 1 << c;
  }
  return [ff, gg, hh];
}

export type ScaleOctaveForm = 1 | 2;

/** The range of one offset: −64…+63 cents in the 1-byte form, ±100 cents in the 2-byte form. */
export function scaleOctaveLimits(form: ScaleOctaveForm): { lowest: number; highest: number } {
  return form === 1 ? { lowest: -64, highest: 63 } : { lowest: -100, highest: (8191 * 100) / 8192 };
}

/**
 * Real-time scale/octave tuning: `F0 7F dev 08 08 ff gg hh ss×12 F7` (1-byte: 40H = 0 cents,
 * 1-cent steps) or `F0 7F dev 08 09 ff gg hh (ss tt)×12 F7` (2-byte: 14 bits, 2000H = 0 cents,
 * 100/8192-cent steps). `offsets` are cents for C, C♯, … B; out-of-range values are clamped.
 */
export function scaleOctaveTuning(device: number, channels: readonly number[], offsets: readonly number[], form: ScaleOctaveForm): number[] {
  const bytes = [SYSEX, 0x7f, device & 0x7f, 0x08, form === 1 ? 0x08 : 0x09, ...channelMask(channels)];
  for (let i = 0; i < 12; i++) {
    const cents = offsets[i] ?? 0;
    if (form === 1) bytes.push(Math.max(0, Math.min(127, 64 + Math.round(cents))));
    else {
      const v = Math.max(0, Math.min(16383, 8192 + Math.round((cents / 100) * 8192)));
      bytes.push(v >> 7, v & 0x7f);
    }
  }
  bytes.push(EOX);
  return bytes;
}

/** What a scale/octave offset of `cents` becomes once encoded (for reporting quantisation). */
export function quantiseScaleOctave(cents: number, form: ScaleOctaveForm): number {
  if (form === 1) return Math.max(-64, Math.min(63, Math.round(cents)));
  return (Math.max(0, Math.min(16383, 8192 + Math.round((cents / 100) * 8192))) - 8192) * (100 / 8192);
}
