/** Status nibbles and controller numbers of MIDI 1.0 used across the project. */
export const NOTE_OFF = 0x80;
export const NOTE_ON = 0x90;
export const POLY_PRESSURE = 0xa0;
export const CONTROL_CHANGE = 0xb0;
export const PROGRAM_CHANGE = 0xc0;
export const CHANNEL_PRESSURE = 0xd0;
export const PITCH_BEND = 0xe0;
export const SYSEX = 0xf0;
export const EOX = 0xf7;
export const ACTIVE_SENSING = 0xfe;

export const CC = {
  bankSelect: 0,
  dataEntry: 6,
  bankSelectLsb: 32,
  dataEntryLsb: 38,
  sustain: 64,
  sostenuto: 66,
  soft: 67,
  dataIncrement: 96,
  dataDecrement: 97,
  nrpnLsb: 98,
  nrpnMsb: 99,
  rpnLsb: 100,
  rpnMsb: 101,
  allSoundOff: 120,
  resetAllControllers: 121,
  localControl: 122,
  allNotesOff: 123,
  omniOff: 124,
  omniOn: 125,
  monoOn: 126,
  polyOn: 127,
} as const;

/** A message as bytes, with the time (ms) at which it is to be sent. */
export interface TimedMessage {
  readonly time: number;
  readonly data: readonly number[];
}

const d7 = (n: number): number => Math.max(0, Math.min(127, Math.round(n))) & 0x7f;
const ch4 = (channel: number): number => channel & 0x0f;

/** Channels are 0…15 in code (channel 1 on a synth's display is 0). */
export const noteOn = (channel: number, key: number, velocity: number): number[] => [NOTE_ON | ch4(channel), d7(key), d7(velocity)];
export const noteOff = (channel: number, key: number, velocity = 0): number[] => [NOTE_OFF | ch4(channel), d7(key), d7(velocity)];
export const controlChange = (channel: number, controller: number, value: number): number[] => [CONTROL_CHANGE | ch4(channel), d7(controller), d7(value)];
export const programChange = (channel: number, program: number): number[] => [PROGRAM_CHANGE | ch4(channel), d7(program)];
export const channelPressure = (channel: number, value: number): number[] => [CHANNEL_PRESSURE | ch4(channel), d7(value)];
export const polyPressure = (channel: number, key: number, value: number): number[] => [POLY_PRESSURE | ch4(channel), d7(key), d7(value)];

/** Pitch bend with a 14-bit value, 8192 = centre (MIDI 1.0: LSB first, then MSB). */
export function pitchBend(channel: number, value: number): number[] {
  const v = Math.max(0, Math.min(16383, Math.round(value)));
  return [PITCH_BEND | ch4(channel), v & 0x7f, v >> 7];
}

/**
 * Sets a registered parameter: CC101 (MSB) and CC100 (LSB) select it, CC6 and CC38 carry the
 * value, and CC101/CC100 = 127 (the null RPN) deselect it so later data entry changes nothing.
 */
export function registeredParameter(channel: number, msb: number, lsb: number, valueMsb: number, valueLsb?: number): number[][] {
  const messages = [controlChange(channel, CC.rpnMsb, msb), controlChange(channel, CC.rpnLsb, lsb), controlChange(channel, CC.dataEntry, valueMsb)];
  if (valueLsb !== undefined) messages.push(controlChange(channel, CC.dataEntryLsb, valueLsb));
  messages.push(controlChange(channel, CC.rpnMsb, 127), controlChange(channel, CC.rpnLsb, 127));
  return messages;
}

/** RPN 0, pitch-bend sensitivity: whole semitones in CC6, cents in CC38. */
export function bendSensitivity(channel: number, semitones: number): number[][] {
  const whole = Math.floor(semitones);
  return registeredParameter(channel, 0, 0, whole, Math.round((semitones - whole) * 100));
}

/** The MPE Configuration Message (MMA RP-053): RPN 6 on the zone's master channel, members in CC6. */
export function mpeConfiguration(masterChannel: number, memberCount: number): number[][] {
  return registeredParameter(masterChannel, 0, 6, memberCount);
}

/** Data bytes a channel message of this status takes (MIDI 1.0). */
export function channelDataLength(status: number): number {
  const kind = status & 0xf0;
  return kind === PROGRAM_CHANGE || kind === CHANNEL_PRESSURE ? 1 : 2;
}

/** Data bytes a system common message takes; undefined for the undefined F4/F5 and for F0/F7. */
export function systemCommonDataLength(status: number): number | undefined {
  switch (status) {
    case 0xf1:
    case 0xf3:
      return 1;
    case 0xf2:
      return 2;
    case 0xf6:
      return 0;
    default:
      return undefined;
  }
}

export function isRealTime(status: number): boolean {
  return status >= 0xf8;
}
