/**
 * A reference synth: what a real synth does with the messages diesis sends, written from the
 * documents rather than from the engine (the tests check the engine against it; the demo and
 * virtual ports sound through it):
 * - MIDI 1.0 Detailed Specification: note on/off (velocity 0 = off), control change, sustain (64,
 *   on at ≥ 64), sostenuto (66), All Sound Off (120), Reset All Controllers (121, which centres
 *   pitch bend and lifts pedals per RP-015), All Notes Off (123, obeying sustain), RPN 0 pitch-bend
 *   sensitivity (CC101/100 select, CC6 semitones, CC38 cents), 14-bit pitch bend (LSB, MSB, 8192 = 0);
 * - MPE (MMA RP-053): RPN 6 on channel 1 (or 16) configures a lower (upper) zone of N members; on
 *   receipt member bend ranges become ±48 and the master's ±2; the master's pitch bend, pedals,
 *   All Notes Off and All Sound Off apply to every note of the zone;
 * - MIDI Tuning Standard: real-time single note tuning change `F0 7F dev 08 02 tt ll [kk xx yy zz]… F7`
 *   (7F 7F 7F = no change) retunes keys at once, sounding ones included; real-time scale/octave
 *   tuning `F0 7F dev 08 08|09 ff gg hh …` sets a per-channel offset per key class (1-byte: 40H = 0,
 *   cents; 2-byte: 2000H = 0, 100/8192 cent).
 * Voices: held (key down), sustained (released under a pedal), tail (released, still ringing for
 * `tailMs`). Frequencies: A4 · 2^((keyPosition + offsets + bends − 69)/12).
 */

export type VoiceState = 'held' | 'sustained' | 'tail';

export interface ModelVoice {
  readonly channel: number;
  readonly key: number;
  readonly velocity: number;
  readonly onsetTime: number;
  state: VoiceState;
  latched: boolean;
  endTime: number;
  /** Free for a caller (a test, a display) to attach what it knows of this voice. */
  tag: unknown;
}

interface ChannelModel {
  bend: number;
  bendRange: number;
  sustain: boolean;
  sostenuto: boolean;
  rpnMsb: number;
  rpnLsb: number;
  octaveOffsets: number[];
}

export class SynthModel {
  readonly voices: ModelVoice[] = [];
  /** Key position (semitones, 69 = A4) of each key: the MTS key-based table. */
  readonly keyTable: number[] = Array.from({ length: 128 }, (_, k) => k);
  readonly channels: ChannelModel[] = Array.from({ length: 16 }, () => ({
    bend: 8192,
    bendRange: 2,
    sustain: false,
    sostenuto: false,
    rpnMsb: 127,
    rpnLsb: 127,
    octaveOffsets: new Array<number>(12).fill(0),
  }));
  /** The MPE zone, if configured: master channel and member channels (0…15). */
  zone: { master: number; members: number[] } | undefined;
  /** Note-ons that arrived for a key already held on that channel. */
  doubleNoteOns = 0;
  time = 0;

  constructor(
    readonly a4 = 440,
    readonly tailMs = 0,
  ) {}

  private masterOf(channel: number): number | undefined {
    return this.zone && this.zone.members.includes(channel) ? this.zone.master : undefined;
  }

  /** Channels a channel message on `channel` acts on: itself, or the whole zone for the master. */
  private scope(channel: number): number[] {
    return this.zone && this.zone.master === channel ? [channel, ...this.zone.members] : [channel];
  }

  private sustaining(channel: number): boolean {
    const master = this.masterOf(channel);
    return this.channels[channel]!.sustain || (master !== undefined && this.channels[master]!.sustain);
  }

  private sostenutoOn(channel: number): boolean {
    const master = this.masterOf(channel);
    return this.channels[channel]!.sostenuto || (master !== undefined && this.channels[master]!.sostenuto);
  }

  /** Current frequency of a voice in Hz. */
  frequency(v: ModelVoice): number {
    const ch = this.channels[v.channel]!;
    let semitones = this.keyTable[v.key]! + ch.octaveOffsets[v.key % 12]! / 100 + ((ch.bend - 8192) / 8192) * ch.bendRange;
    const master = this.masterOf(v.channel);
    if (master !== undefined) {
      const m = this.channels[master]!;
      semitones += ((m.bend - 8192) / 8192) * m.bendRange;
    }
    return this.a4 * 2 ** ((semitones - 69) / 12);
  }

  /** Voices that sound now: held, sustained, and tails still ringing. */
  sounding(): ModelVoice[] {
    return this.voices.filter((v) => v.state !== 'tail' || this.time - v.endTime < this.tailMs);
  }

  /** Held or sustained voices only. */
  active(): ModelVoice[] {
    return this.voices.filter((v) => v.state !== 'tail');
  }

  private end(v: ModelVoice): void {
    v.state = 'tail';
    v.endTime = this.time;
  }

  private release(v: ModelVoice): void {
    if (this.sustaining(v.channel) || (v.latched && this.sostenutoOn(v.channel))) v.state = 'sustained';
    else this.end(v);
  }

  private pedalsMoved(channels: number[]): void {
    for (const v of this.voices) {
      if (v.state !== 'sustained' || !channels.includes(v.channel)) continue;
      if (!this.sustaining(v.channel) && !(v.latched && this.sostenutoOn(v.channel))) this.end(v);
    }
  }

  /** Lets time pass: release tails older than `tailMs` fall silent. */
  advance(time: number): void {
    this.time = time;
    for (let i = this.voices.length - 1; i >= 0; i--) {
      const v = this.voices[i]!;
      if (v.state === 'tail' && time - v.endTime >= this.tailMs) this.voices.splice(i, 1);
    }
  }

  /** Receives one whole message at `time` (ms). Returns the voice a note-on started, if any. */
  receive(time: number, data: readonly number[]): ModelVoice | undefined {
    this.advance(time);
    const status = data[0]!;
    if (status === 0xf0) {
      this.sysex(data);
      return undefined;
    }
    if (status >= 0xf0) return undefined;
    const channel = status & 0x0f;
    const kind = status & 0xf0;
    const a = data[1]!;
    const b = data[2] ?? 0;
    const ch = this.channels[channel]!;
    if (kind === 0x90 && b > 0) {
      if (this.voices.some((v) => v.channel === channel && v.key === a && v.state === 'held')) this.doubleNoteOns++;
      const voice: ModelVoice = { channel, key: a, velocity: b, onsetTime: time, state: 'held', latched: false, endTime: Infinity, tag: undefined };
      this.voices.push(voice);
      return voice;
    }
    if (kind === 0x80 || kind === 0x90) {
      const v = this.voices.find((x) => x.channel === channel && x.key === a && x.state === 'held');
      if (v) this.release(v);
      return undefined;
    }
    if (kind === 0xe0) {
      ch.bend = a | (b << 7);
      return undefined;
    }
    if (kind !== 0xb0) return undefined;
    switch (a) {
      case 64:
        ch.sustain = b >= 64;
        this.pedalsMoved(this.scope(channel));
        break;
      case 66: {
        const down = b >= 64;
        if (down && !ch.sostenuto) for (const v of this.voices) if (this.scope(channel).includes(v.channel) && v.state === 'held') v.latched = true;
        ch.sostenuto = down;
        if (!down) for (const v of this.voices) if (this.scope(channel).includes(v.channel)) v.latched = false;
        this.pedalsMoved(this.scope(channel));
        break;
      }
      case 101:
        ch.rpnMsb = b;
        break;
      case 100:
        ch.rpnLsb = b;
        break;
      case 6:
        if (ch.rpnMsb === 0 && ch.rpnLsb === 0) ch.bendRange = b + (Math.round((ch.bendRange % 1) * 100) / 100);
        if (ch.rpnMsb === 0 && ch.rpnLsb === 6 && (channel === 0 || channel === 15)) this.configureZone(channel, b);
        break;
      case 38:
        if (ch.rpnMsb === 0 && ch.rpnLsb === 0) ch.bendRange = Math.floor(ch.bendRange) + b / 100;
        break;
      case 120:
        for (let i = this.voices.length - 1; i >= 0; i--) if (this.scope(channel).includes(this.voices[i]!.channel)) this.voices.splice(i, 1);
        break;
      case 121:
        for (const c of this.scope(channel)) {
          const x = this.channels[c]!;
          x.bend = 8192;
          x.sustain = false;
          x.sostenuto = false;
        }
        this.pedalsMoved(this.scope(channel));
        break;
      case 123:
        for (const v of this.voices) if (this.scope(channel).includes(v.channel) && v.state === 'held') this.release(v);
        break;
    }
    return undefined;
  }

  private configureZone(master: number, count: number): void {
    if (count === 0) {
      this.zone = undefined;
      return;
    }
    const members = master === 0 ? Array.from({ length: count }, (_, i) => i + 1) : Array.from({ length: count }, (_, i) => 14 - i);
    this.zone = { master, members };
    this.channels[master]!.bendRange = 2;
    for (const m of members) this.channels[m]!.bendRange = 48;
  }

  private sysex(data: readonly number[]): void {
    if (data[1] !== 0x7f || data[3] !== 0x08) return; // only real-time MIDI tuning messages
    const sub = data[4];
    if (sub === 0x02) {
      if (data[5] !== 0) return; // tuning program 0 is the one in use
      const count = data[6]!;
      for (let i = 0; i < count; i++) {
        const [kk, xx, yy, zz] = data.slice(7 + 4 * i, 11 + 4 * i) as [number, number, number, number];
        if (xx === 0x7f && yy === 0x7f && zz === 0x7f) continue;
        this.keyTable[kk] = xx + ((yy << 7) | zz) / 16384;
      }
      return;
    }
    if (sub === 0x08 || sub === 0x09) {
      const [ff, gg, hh] = [data[5]!, data[6]!, data[7]!];
      const targets: number[] = [];
      for (let c = 0; c < 16; c++) {
        const on = c >= 14 ? (ff >> (c - 14)) & 1 : c >= 7 ? (gg >> (c - 7)) & 1 : (hh >> c) & 1;
        if (on) targets.push(c);
      }
      for (let i = 0; i < 12; i++) {
        const cents = sub === 0x08 ? data[8 + i]! - 64 : (((data[8 + 2 * i]! << 7) | data[9 + 2 * i]!) - 8192) * (100 / 8192);
        for (const c of targets) this.channels[c]!.octaveOffsets[i] = cents;
      }
    }
  }
}

/** Checks one message against MIDI 1.0's shapes: a status first, 7-bit data, the right length. */
export function malformation(data: readonly number[]): string | undefined {
  const status = data[0];
  if (status === undefined || status < 0x80) return 'no status byte';
  if (data.slice(1).some((b, i) => !Number.isInteger(b) || b < 0 || (b > 0x7f && !(status === 0xf0 && i === data.length - 2 && b === 0xf7)))) return 'bad data byte';
  if (status === 0xf0) return data[data.length - 1] === 0xf7 ? undefined : 'sysex without F7';
  const lengths: Record<number, number> = { 0x80: 3, 0x90: 3, 0xa0: 3, 0xb0: 3, 0xc0: 2, 0xd0: 2, 0xe0: 3 };
  const expected = status < 0xf0 ? lengths[status & 0xf0] : status === 0xf1 || status === 0xf3 ? 2 : status === 0xf2 ? 3 : 1;
  return data.length === expected ? undefined : `length ${data.length}, expected ${expected}`;
}
