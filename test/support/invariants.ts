import { malformation, SynthModel, type ModelVoice } from '../../src/synth/reference-synth.js';
import { isNoteOn } from './reference-stream.js';

/**
 * The promises diesis makes about its output, checked against the reference synth (written from
 * the MIDI 1.0, MPE and MTS documents, not from the engine), for the fuzz tests and the bench:
 *
 * - every output message is well-formed MIDI 1.0;
 * - no note's pitch moves while it sounds (held, sustained, or ringing in its release tail): no
 *   pitch bend and no MTS retune under it, checked after every single message, so a retune that
 *   is put right later in the same burst still counts. The documented exceptions: the player's
 *   wheel (a pitch-bend message, or a Reset All Controllers that centres a wheel that was off
 *   centre); a steal (the note got its note-off earlier in the same burst, then its unit was
 *   retuned); a panic (it centres every bend); in `mts-octave`, a new note of the same key class
 *   (that mode's documented limit);
 * - one output note-on per input note-on, less the notes the engine reports it could not place;
 * - the synth never receives a second note-on for a key it already holds on that channel;
 * - at the end, once the player has let go of every key and pedal, nothing is held or
 *   sustained, and after the release time nothing rings;
 * - a device that disappears takes its notes and pedals with it (README, hot-plug): no note it
 *   started is still held or sustained, and if its pedal was down, no note is left sustained
 *   unless another device's pedal is down too.
 */
export interface InvariantOptions {
  readonly mode: 'bend' | 'mts-note' | 'mts-octave' | 'pass';
  /** How long a released note rings in the synth (diesis's release guard), ms. */
  readonly tailMs: number;
  readonly synthA4?: number;
  /** Violations kept with their details (all are counted). */
  readonly keep?: number;
}

export interface InvariantCounts {
  inputNoteOns: number;
  outputNoteOns: number;
  /** Notes the engine reported it could not place (tuned key outside 0…127). */
  dropped: number;
  malformed: number;
  /** Times a sounding note's pitch moved outside the documented cases. */
  retunesUnderNotes: number;
  doubleNoteOns: number;
  /** Held or sustained at the end, after the player let go of everything. */
  stuck: number;
  /** Held or sustained after the device that started them, or whose pedal held them, went away. */
  stuckAfterUnplug: number;
  /** Still ringing after the release time at the end. */
  ringing: number;
}

export class InvariantChecker {
  readonly synth: SynthModel;
  readonly counts: InvariantCounts = { inputNoteOns: 0, outputNoteOns: 0, dropped: 0, malformed: 0, retunesUnderNotes: 0, doubleNoteOns: 0, stuck: 0, stuckAfterUnplug: 0, ringing: 0 };
  readonly violations: string[] = [];
  private readonly pitch = new WeakMap<ModelVoice, number>();
  /** Voices that got their note-off in the burst being checked (a steal may retune them next). */
  private endedInBurst = new Set<ModelVoice>();
  private allowed = { wheel: false };
  /** In `mts-octave`: notes moved in this burst, excused if a new note of their key class starts in it. */
  private movedInBurst: Array<{ voice: ModelVoice; text: string }> = [];
  private noteClassesInBurst = new Set<number>();
  private wheelOffCentre = false;
  /** The registered parameter each input channel has selected (MSB, LSB). */
  private readonly rpn = new Map<number, [number, number]>();
  /** The source of each note the engine started, in order, until its note-on arrives. */
  private readonly startedBy: number[] = [];
  /** Whether each source's own last pedal message left a pedal down. */
  private readonly pedalDown = new Map<number, { sustain: boolean; sostenuto: boolean }>();

  constructor(private readonly options: InvariantOptions) {
    this.synth = new SynthModel(options.synthA4 ?? 440, options.tailMs);
  }

  private violation(text: string): void {
    if (this.violations.length < (this.options.keep ?? 20)) this.violations.push(text);
  }

  /**
   * The input messages (whole, as the engine will read them) that the next output burst answers.
   * Call before feeding their output; `burst` starts the burst.
   */
  input(messages: ReadonlyArray<readonly number[]>, source = 0): void {
    this.endBurst();
    let wheel = false;
    for (const m of messages) {
      if (isNoteOn(m)) this.counts.inputNoteOns++;
      if (m[0]! < 0xf0 && (m[0]! & 0xf0) === 0xb0) {
        const pedals = this.pedalDown.get(source) ?? { sustain: false, sostenuto: false };
        if (m[1] === 64) pedals.sustain = m[2]! >= 64;
        if (m[1] === 66) pedals.sostenuto = m[2]! >= 64;
        if (m[1] === 121) pedals.sustain = pedals.sostenuto = false;
        this.pedalDown.set(source, pedals);
      }
      const kind = m[0]! & 0xf0;
      if (m[0]! < 0xf0 && kind === 0xe0) {
        wheel = true;
        this.wheelOffCentre = (m[1]! | (m[2]! << 7)) !== 8192;
      }
      if (m[0]! < 0xf0 && kind === 0xb0 && m[1] === 121) {
        if (this.wheelOffCentre) wheel = true; // the reset centres the wheel: notes move with it
        this.wheelOffCentre = false;
      }
      if (m[0]! < 0xf0 && kind === 0xb0) {
        // The keyboard's RPN 0 (MIDI 1.0: CC101/100 select, CC6/38 carry the value) changes the
        // wheel's range: with the wheel off centre the notes move with it, as on any synth.
        const id = source * 16 + (m[0]! & 0x0f);
        const rpn = this.rpn.get(id) ?? [127, 127];
        if (m[1] === 101) rpn[0] = m[2]!;
        if (m[1] === 100) rpn[1] = m[2]!;
        if (m[1] === 98 || m[1] === 99) rpn[0] = rpn[1] = 127; // an NRPN deselects the RPN
        this.rpn.set(id, rpn);
        if ((m[1] === 6 || m[1] === 38) && rpn[0] === 0 && rpn[1] === 0 && this.wheelOffCentre) wheel = true;
      }
    }
    this.allowed = { wheel };
  }

  private endBurst(): void {
    for (const { voice, text } of this.movedInBurst) {
      if (this.noteClassesInBurst.has(voice.channel * 12 + (voice.key % 12))) continue;
      this.counts.retunesUnderNotes++;
      this.violation(text);
    }
    this.movedInBurst = [];
    this.noteClassesInBurst = new Set();
    this.endedInBurst = new Set();
  }

  /**
   * The burst being checked is a panic (the player's control, a lost sender, the end of a file):
   * it ends every note and centres every bend by design, release tails included.
   */
  panicking(): void {
    this.allowed = { wheel: true };
  }

  /** The engine started a note from `source` (its note-on is in the output that follows). */
  noteStarted(source: number): void {
    this.startedBy.push(source);
  }

  /** Call once the engine's output for an unplugged device has been fed. */
  unplugged(source: number): void {
    const own = this.pedalDown.get(source);
    const heldItsPedal = own !== undefined && (own.sustain || own.sostenuto);
    const otherPedal = [...this.pedalDown].some(([s, p]) => s !== source && (p.sustain || p.sostenuto));
    this.pedalDown.delete(source);
    for (const v of this.synth.active()) {
      const mine = (v.tag as { source?: number } | undefined)?.source === source;
      if (!mine && !(heldItsPedal && !otherPedal && v.state === 'sustained')) continue;
      this.counts.stuckAfterUnplug++;
      this.violation(`${v.state} note ${v.key} on channel ${v.channel + 1} still sounds after device ${source} went away`);
    }
  }

  /** The engine reported a note it could not place. */
  noteDropped(): void {
    this.counts.dropped++;
  }

  /** One output message, at `time` ms. */
  output(time: number, data: readonly number[]): void {
    const problem = malformation(data);
    if (problem) {
      this.counts.malformed++;
      this.violation(`malformed output ${JSON.stringify(data)}: ${problem}`);
      return;
    }
    const doublesBefore = this.synth.doubleNoteOns;
    const ending = endsNotes(data);
    const heldBefore = ending ? this.synth.active() : [];
    const voice = this.synth.receive(time, data);
    if (this.synth.doubleNoteOns > doublesBefore) {
      this.counts.doubleNoteOns++;
      this.violation(`a second note-on for a held key: ${JSON.stringify(data)} at ${time} ms`);
    }
    if (voice) {
      this.counts.outputNoteOns++;
      this.noteClassesInBurst.add(voice.channel * 12 + (voice.key % 12));
      voice.tag = { source: this.startedBy.shift() };
      this.pitch.set(voice, this.synth.frequency(voice));
      return;
    }
    for (const v of heldBefore) if (v.state === 'tail') this.endedInBurst.add(v);
    if (canMovePitch(data)) this.checkPitches(time, data);
  }

  private checkPitches(time: number, cause: readonly number[]): void {
    for (const v of this.synth.sounding()) {
      const before = this.pitch.get(v);
      const now = this.synth.frequency(v);
      this.pitch.set(v, now);
      if (before === undefined || Math.abs(now / before - 1) < 1e-9) continue;
      if (this.allowed.wheel || this.endedInBurst.has(v)) continue;
      const text = `${v.state} note ${v.key} on channel ${v.channel + 1} moved from ${before.toFixed(3)} to ${now.toFixed(3)} Hz at ${time} ms by ${JSON.stringify(cause.slice(0, 12))}`;
      if (this.options.mode === 'mts-octave') this.movedInBurst.push({ voice: v, text });
      else {
        this.counts.retunesUnderNotes++;
        this.violation(text);
      }
    }
  }

  /**
   * The end: call after the player has let go of every key and pedal (and the engine's output for
   * that has been fed). Counts what is still held or sustained, and what still rings once the
   * release time has passed.
   */
  finish(time: number): InvariantCounts {
    this.endBurst();
    this.synth.advance(time);
    this.counts.stuck = this.synth.active().length;
    for (const v of this.synth.active()) this.violation(`stuck: key ${v.key} on channel ${v.channel + 1} (${v.state}) at the end`);
    this.synth.advance(time + this.options.tailMs + 1);
    this.counts.ringing = this.synth.sounding().length;
    const expected = this.counts.inputNoteOns - this.counts.dropped;
    if (this.counts.outputNoteOns !== expected) this.violation(`${this.counts.outputNoteOns} output note-ons for ${this.counts.inputNoteOns} input note-ons (${this.counts.dropped} reported dropped)`);
    return this.counts;
  }

  /** True when every promise held. */
  get clean(): boolean {
    const c = this.counts;
    return c.malformed === 0 && c.retunesUnderNotes === 0 && c.doubleNoteOns === 0 && c.stuck === 0 && c.stuckAfterUnplug === 0 && c.ringing === 0 && c.outputNoteOns === c.inputNoteOns - c.dropped;
  }
}

/** Messages that can end notes in the reference synth: note-offs, pedals, resets, All Notes Off. */
function endsNotes(data: readonly number[]): boolean {
  const kind = data[0]! & 0xf0;
  return data[0]! < 0xf0 && (kind === 0x80 || kind === 0x90 || kind === 0xb0);
}

/** Messages that can change a sounding note's pitch in the reference synth: bends, MTS, RPN changes, a controller reset. */
function canMovePitch(data: readonly number[]): boolean {
  const status = data[0]!;
  if (status === 0xf0) return true;
  const kind = status & 0xf0;
  return kind === 0xe0 || (kind === 0xb0 && [6, 38, 100, 101, 121].includes(data[1]!));
}
