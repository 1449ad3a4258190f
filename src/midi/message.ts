import { ACTIVE_SENSING, CHANNEL_PRESSURE, CONTROL_CHANGE, NOTE_OFF, NOTE_ON, PITCH_BEND, POLY_PRESSURE, PROGRAM_CHANGE } from './bytes.js';

/**
 * A whole MIDI 1.0 message, decoded once. A note-on with velocity 0 is a note-off (MIDI 1.0);
 * system messages other than active sensing are kept as bytes, since the engine only forwards them.
 */
export type MidiMessage =
  | { readonly kind: 'note-on'; readonly channel: number; readonly key: number; readonly velocity: number }
  | { readonly kind: 'note-off'; readonly channel: number; readonly key: number; readonly velocity: number }
  | { readonly kind: 'poly-pressure'; readonly channel: number; readonly key: number; readonly value: number }
  | { readonly kind: 'control'; readonly channel: number; readonly controller: number; readonly value: number }
  | { readonly kind: 'program'; readonly channel: number; readonly program: number }
  | { readonly kind: 'channel-pressure'; readonly channel: number; readonly value: number }
  | { readonly kind: 'pitch-bend'; readonly channel: number; /** 14-bit, 8192 = centre. */ readonly value: number }
  | { readonly kind: 'active-sensing' }
  | { readonly kind: 'system'; readonly data: readonly number[] };

export type MessageKind = MidiMessage['kind'];

/** Decodes one whole message as the stream parser delivers it (status first, data bytes 0…127). */
export function decodeMessage(data: readonly number[]): MidiMessage {
  const status = data[0] ?? 0;
  if (status === ACTIVE_SENSING) return { kind: 'active-sensing' };
  if (status >= 0xf0) return { kind: 'system', data };
  const channel = status & 0x0f;
  const a = data[1] ?? 0;
  const b = data[2] ?? 0;
  switch (status & 0xf0) {
    case NOTE_ON:
      return b > 0 ? { kind: 'note-on', channel, key: a, velocity: b } : { kind: 'note-off', channel, key: a, velocity: 0 };
    case NOTE_OFF:
      return { kind: 'note-off', channel, key: a, velocity: b };
    case POLY_PRESSURE:
      return { kind: 'poly-pressure', channel, key: a, value: b };
    case CONTROL_CHANGE:
      return { kind: 'control', channel, controller: a, value: b };
    case PROGRAM_CHANGE:
      return { kind: 'program', channel, program: a };
    case CHANNEL_PRESSURE:
      return { kind: 'channel-pressure', channel, value: a };
    case PITCH_BEND:
      return { kind: 'pitch-bend', channel, value: a | (b << 7) };
    default:
      return { kind: 'system', data }; // unreachable for parser output: status < 0x80 never arrives
  }
}
