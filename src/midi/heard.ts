import type { MidiMessage } from './message.js';

// What a device sends, in a player's words: for `diesis ports --watch` and `--learn`, so nobody
// has to look up controller numbers.

/**
 * Names of the controllers a player meets on pedals and wheels. Numbers and names from the MIDI
 * 1.0 Detailed Specification's control change table (from memory).
 */
const CONTROLLER_NAMES: Readonly<Record<number, string>> = {
  1: 'modulation wheel',
  2: 'breath controller',
  4: 'foot controller',
  7: 'volume',
  11: 'expression pedal',
  64: 'sustain pedal',
  65: 'portamento switch',
  66: 'sostenuto pedal',
  67: 'soft pedal',
  68: 'legato footswitch',
  69: 'hold 2',
};

const KEY_NAMES = ['C', 'C♯/D♭', 'D', 'D♯/E♭', 'E', 'F', 'F♯/G♭', 'G', 'G♯/A♭', 'A', 'A♯/B♭', 'B'] as const;

/** `61` → `C♯4/D♭4` (C4 = key 60; both names of a black key, since the key alone does not say which). */
export function keyName(key: number): string {
  const octave = Math.floor(key / 12) - 1;
  return KEY_NAMES[key % 12]!.split('/').map((n) => `${n}${octave}`).join('/');
}

/** `controller 64 (sustain pedal)`. */
export function controllerText(controller: number): string {
  const name = CONTROLLER_NAMES[controller];
  return `controller ${controller}${name ? ` (${name})` : ''}`;
}

const channelText = (channel: number): string => `on channel ${channel + 1}`;

/** One message in a player's words; undefined for timing messages that would flood the screen (clock, active sensing). */
export function describeMessage(m: MidiMessage): string | undefined {
  switch (m.kind) {
    case 'note-on':
      return `key ${m.key} (${keyName(m.key)}) ${channelText(m.channel)}: pressed, velocity ${m.velocity}`;
    case 'note-off':
      return `key ${m.key} (${keyName(m.key)}) ${channelText(m.channel)}: let go`;
    case 'poly-pressure':
      return `pressure on key ${m.key} (${keyName(m.key)}) ${channelText(m.channel)}: ${m.value}`;
    case 'control':
      return `${controllerText(m.controller)} ${channelText(m.channel)}: ${m.value}`;
    case 'program':
      return `program change ${m.program} ${channelText(m.channel)} (${m.program + 1} on a display counting from 1)`;
    case 'channel-pressure':
      return `pressure ${channelText(m.channel)}: ${m.value}`;
    case 'pitch-bend': {
      const offset = m.value - 8192;
      return `pitch wheel ${channelText(m.channel)}: ${offset > 0 ? '+' : ''}${offset} (of ±8192)`;
    }
    case 'active-sensing':
      return undefined;
    case 'system': {
      const status = m.data[0] ?? 0;
      if (status >= 0xf8) return undefined; // clock, start, stop…: real-time timing
      const hex = m.data.slice(0, 6).map((b) => b.toString(16).toUpperCase().padStart(2, '0')).join(' ');
      return status === 0xf0 ? `system exclusive, ${m.data.length} bytes: ${hex}${m.data.length > 6 ? ' …' : ''}` : `system message ${hex}`;
    }
  }
}
