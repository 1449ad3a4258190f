import {
  ACTIVE_SENSING,
  CC,
  CHANNEL_PRESSURE,
  channelPressure,
  CONTROL_CHANGE,
  controlChange,
  NOTE_OFF,
  NOTE_ON,
  noteOff,
  noteOn,
  PITCH_BEND,
  POLY_PRESSURE,
  polyPressure,
  PROGRAM_CHANGE,
  programChange,
  type TimedMessage,
} from '../midi/bytes.js';
import { MidiStreamParser } from '../midi/parser.js';
import { BEND_CENTRE } from '../midi/pitch-bend.js';
import { keyOf, samePitch, spellKey, type SpelledPitch } from '../pitch/index.js';
import type { ControlMap, RouterAction } from '../spelling/control-map.js';
import type { NoteContext, Speller } from '../spelling/speller.js';
import { EQUAL_TEMPERAMENT } from './equal-temperament.js';
import type { OutputStrategy, PlaceContext, Placement } from './output.js';
import { PitchTable, type TunedNote } from './pitch-table.js';

/** Silence after an active-sensing byte that means the sender is gone (MIDI 1.0). */
export const ACTIVE_SENSING_TIMEOUT_MS = 300;

/** What the router decided, for displays and logs (never needed for the output itself). */
export type RouterEvent =
  | { readonly type: 'note'; readonly time: number; readonly source: number; readonly inChannel: number; readonly inKey: number; readonly velocity: number; readonly pitch: SpelledPitch; readonly hz: number; /** From 12-ET at the reference. */ readonly cents: number; readonly placement: Placement }
  | { readonly type: 'key-up'; readonly time: number; readonly source: number; readonly inChannel: number; readonly inKey: number }
  | { readonly type: 'note-dropped'; readonly time: number; readonly inKey: number; readonly reason: string }
  | { readonly type: 'out-of-range'; readonly time: number; readonly pitch: SpelledPitch; readonly neededCents: number }
  | { readonly type: 'steal'; readonly time: number; readonly voices: number }
  | { readonly type: 'panic'; readonly time: number; readonly reason: string };

export interface RouterSetup {
  readonly table: PitchTable;
  readonly speller: Speller;
  readonly output: OutputStrategy;
  /** Initial wheel range of the player's keyboard in semitones; RPN 0 from the keyboard changes it. */
  readonly wheelRange: number;
  /** The player's pedals, key switches and program changes bound to spelling actions. */
  readonly controls?: ControlMap | undefined;
  /**
   * Live: how long to wait for the rest of a chord before spelling it (0: spell each note at once).
   * Files: `'same-time'` spells note-ons with equal timestamps as one chord.
   */
  readonly gather?: number | 'same-time' | undefined;
  readonly observer?: ((event: RouterEvent) => void) | undefined;
}

export interface RouterStats {
  notesIn: number;
  notesOut: number;
  notesDropped: number;
  outOfRange: number;
  malformedBytes: number;
}

interface Voice {
  readonly inputId: number;
  pitch: SpelledPitch;
  readonly velocity: number;
  readonly placement: Placement;
  /** `channel · 128 + key` of the placement: one voice at most owns a synth key at a time. */
  readonly slot: number;
  keyDown: boolean;
  /** Its synth note was already ended (stolen, or handed to a newer note on the same synth key). */
  silenced: boolean;
  latched: boolean;
}

type ParamSelection = 'none' | 'rpn' | 'nrpn';

/**
 * The engine: raw MIDI in with timestamps, raw MIDI out with timestamps; no I/O, no clock.
 * It spells each note (through the speller), tunes it (through the pitch table), places it
 * (through the output strategy), and keeps the book of keys, pedals and voices so that every note
 * it starts is ended: on key up, on pedal up, on All Notes Off, on an active-sensing timeout and
 * on panic.
 */
export class Router {
  readonly stats: RouterStats = { notesIn: 0, notesOut: 0, notesDropped: 0, outOfRange: 0, malformedBytes: 0 };
  private readonly parsers = new Map<number, MidiStreamParser>();
  /** Keys down, by input id (source, channel, key). */
  private readonly down = new Map<number, Voice>();
  /** Every voice still sounding: keys down and keys released under a pedal. */
  private readonly sounding = new Set<Voice>();
  /** The voice whose note-on is the latest on each synth key (channel·128 + key) and not yet ended. */
  private readonly owners = new Map<number, Voice>();
  private sustain = false;
  private sostenuto = false;
  private wheelRange: number;
  private wheelValue = BEND_CENTRE;
  private readonly params = new Map<number, { selection: ParamSelection; msb: number; lsb: number }>();
  private sensing = false;
  private lastInput = 0;
  private out: TimedMessage[] = [];
  private now = 0;
  private readonly tables = new Map<string, PitchTable>();
  private passThrough = false;
  private pending: Array<{ source: number; channel: number; key: number; velocity: number }> = [];
  private pendingSince = 0;
  private readonly context: PlaceContext;

  constructor(private readonly setup: RouterSetup) {
    this.wheelRange = setup.wheelRange;
    this.context = {
      emit: (data) => this.emit(data),
      steal: (which) => this.steal(which),
      outOfRange: (note, needed) => this.reportOutOfRange(note, needed),
    };
  }

  get output(): OutputStrategy {
    return this.setup.output;
  }

  /** True while new notes sound in 12-ET at the reference (the pass control, for comparison). */
  get passing(): boolean {
    return this.passThrough;
  }

  /** The pitch table for new notes: 12-ET while passing; a just table moved to the speller's tonic. */
  private tableNow(): PitchTable {
    const base = this.setup.table;
    const tonic = this.setup.speller.currentTonic();
    const tuning = this.passThrough ? EQUAL_TEMPERAMENT : base.tuning.kind === 'just' && tonic ? base.tuning.withTonic(tonic) : base.tuning;
    if (tuning === base.tuning) return base;
    const id = this.passThrough ? 'pass' : `tonic ${tonic?.fifths}`;
    let table = this.tables.get(id);
    if (!table) {
      table = new PitchTable(tuning, base.reference, base.synthA4);
      this.tables.set(id, table);
    }
    return table;
  }

  private emit(data: number[]): void {
    this.out.push({ time: this.now, data });
  }

  private collect(time: number, work: () => void): TimedMessage[] {
    this.now = time;
    this.out = [];
    work();
    const result = this.out;
    this.out = [];
    return result;
  }

  /** The messages that set a synth up: send at start and whenever the output port (re)appears. */
  start(time: number): TimedMessage[] {
    return this.collect(time, () => this.setup.output.start((d) => this.emit(d)));
  }

  /** Feeds input bytes from one source (a device); any bytes at all, whole messages or not. */
  process(time: number, bytes: ArrayLike<number>, source = 0): TimedMessage[] {
    return this.collect(time, () => {
      let parser = this.parsers.get(source);
      if (!parser) {
        parser = new MidiStreamParser();
        this.parsers.set(source, parser);
      }
      const droppedBefore = parser.dropped;
      parser.feed(bytes, (message) => this.handle(message, source));
      this.stats.malformedBytes += parser.dropped - droppedBefore;
    });
  }

  /** Spells and sounds a chord still being gathered (files call it when the next onset time begins). */
  flush(time: number): TimedMessage[] {
    return this.collect(time, () => this.flushChord());
  }

  /** Lets time pass without input: the active-sensing timeout. Call every few tens of ms live. */
  tick(time: number): TimedMessage[] {
    return this.collect(time, () => {
      if (this.pending.length > 0 && typeof this.setup.gather === 'number' && time - this.pendingSince >= this.setup.gather) this.flushChord();
      if (this.sensing && time - this.lastInput > ACTIVE_SENSING_TIMEOUT_MS) {
        this.sensing = false;
        this.doPanic('active sensing stopped');
      }
    });
  }

  /** Ends every sounding note, lifts pedals, sends All Notes Off and centres bends on every channel used. */
  panic(time: number, reason = 'panic'): TimedMessage[] {
    return this.collect(time, () => this.doPanic(reason));
  }

  /** Carries out a router action asked for from outside the control map (the stage page), as a bound control would. */
  act(time: number, action: RouterAction): TimedMessage[] {
    return this.collect(time, () => this.routerAction(action));
  }

  /** Lets go of every key and lifts the pedals, as a player would at the end: release tails ring on. */
  releaseAll(time: number): TimedMessage[] {
    return this.collect(time, () => {
      this.flushChord();
      for (const id of [...this.down.keys()]) this.keyUp(id, 0);
      if (this.sustain) this.controller(0, CC.sustain, 0);
      if (this.sostenuto) this.controller(0, CC.sostenuto, 0);
    });
  }

  /** A source (device) went away: release every note it holds, at once. */
  releaseSource(time: number, source: number): TimedMessage[] {
    return this.collect(time, () => {
      this.parsers.get(source)?.reset();
      for (const voice of [...this.down.values()]) if (Math.floor(voice.inputId / 2048) === source) this.keyUp(voice.inputId, 0);
    });
  }

  get sustainDown(): boolean {
    return this.sustain;
  }

  get sostenutoDown(): boolean {
    return this.sostenuto;
  }

  /** How many voices sound now (keys down plus those held by pedals). */
  get soundingCount(): number {
    return this.sounding.size;
  }

  private handle(message: number[], source: number): void {
    const status = message[0] ?? 0;
    if (status === ACTIVE_SENSING) {
      this.sensing = true;
      this.lastInput = this.now;
      return;
    }
    this.lastInput = this.now;
    if (status >= 0xf0) {
      this.emit(message); // system exclusive, common and real-time pass through
      return;
    }
    const outcome = this.setup.controls?.intercept(message, source);
    if (outcome) {
      this.flushChord();
      for (const action of outcome.routerActions) this.routerAction(action);
      return;
    }
    const channel = status & 0x0f;
    const a = message[1] ?? 0;
    const b = message[2] ?? 0;
    const kind = status & 0xf0;
    if (kind === NOTE_ON && b > 0) {
      this.gatherNote(source, channel, a, b);
      return;
    }
    this.flushChord();
    switch (kind) {
      case NOTE_ON:
        this.keyUp(inputId(source, channel, a), 0);
        return;
      case NOTE_OFF:
        this.keyUp(inputId(source, channel, a), b);
        return;
      case POLY_PRESSURE: {
        const voice = this.down.get(inputId(source, channel, a));
        if (voice) this.emit(polyPressure(voice.placement.channel, voice.placement.key, b));
        return;
      }
      case CONTROL_CHANGE:
        this.controller(channel, a, b);
        return;
      case PROGRAM_CHANGE:
        for (const c of this.setup.output.zoneChannels) this.emit(programChange(c, a));
        return;
      case CHANNEL_PRESSURE:
        for (const c of this.setup.output.zoneChannels) this.emit(channelPressure(c, a));
        return;
      case PITCH_BEND:
        this.wheelValue = a | (b << 7);
        this.setup.output.wheel(this.wheelValue, this.wheelRange, this.now, (d) => this.emit(d));
        return;
    }
  }

  private gatherNote(source: number, channel: number, key: number, velocity: number): void {
    const gather = this.setup.gather ?? 0;
    if (this.pending.length > 0) {
      const late = gather === 'same-time' ? this.now !== this.pendingSince : this.now - this.pendingSince > gather;
      if (late) this.flushChord();
    }
    if (this.pending.length === 0) this.pendingSince = this.now;
    this.pending.push({ source, channel, key, velocity });
    if (gather === 0) this.flushChord();
  }

  /** Spells the notes gathered so far as one chord and sounds them. */
  private flushChord(): void {
    if (this.pending.length === 0) return;
    const notes = this.pending;
    this.pending = [];
    for (const n of notes) {
      const id = inputId(n.source, n.channel, n.key);
      if (this.down.has(id)) this.keyUp(id, 0); // a second note-on without its note-off: release the first
    }
    const contexts = notes.map((n) => this.contextOf(inputId(n.source, n.channel, n.key), n.velocity));
    const pitches = this.setup.speller.spell(contexts);
    notes.forEach((n, i) => {
      let pitch = pitches[i] ?? spellKey(this.setup.speller.currentWindow(), n.key);
      if (keyOf(pitch) !== n.key) pitch = spellKey(this.setup.speller.currentWindow(), n.key); // never trust a speller blindly
      this.stats.notesIn++;
      this.sound(inputId(n.source, n.channel, n.key), pitch, n.velocity);
    });
  }

  /** Tunes, places and starts one note. */
  private sound(id: number, pitch: SpelledPitch, velocity: number): void {
    const key = id % 128;
    const tuned = this.tableNow().tune(pitch);
    const placement = this.setup.output.place(tuned, this.now, this.context);
    if (!placement) {
      this.stats.notesDropped++;
      this.setup.observer?.({ type: 'note-dropped', time: this.now, inKey: key, reason: 'its tuned key lies outside 0…127' });
      return;
    }
    const slot = placement.channel * 128 + placement.key;
    const previous = this.owners.get(slot);
    if (previous) this.handOver(previous); // re-strike the same synth key cleanly
    this.emit(noteOn(placement.channel, placement.key, velocity));
    this.stats.notesOut++;
    const voice: Voice = { inputId: id, pitch, velocity, placement, slot, keyDown: true, silenced: false, latched: false };
    this.owners.set(slot, voice);
    this.down.set(id, voice);
    this.sounding.add(voice);
    this.setup.observer?.({
      type: 'note',
      time: this.now,
      source: Math.floor(id / 2048),
      inChannel: Math.floor(id / 128) % 16,
      inKey: key,
      velocity,
      pitch,
      hz: tuned.hz,
      cents: tuned.etCents,
      placement,
    });
  }

  private routerAction(action: RouterAction): void {
    if (action === 'panic') this.doPanic('panic control');
    else if (action === 'pass') this.passThrough = !this.passThrough;
    else this.respell();
  }

  /**
   * Respells what sounds now with the context as it is (a sustained chord after a flip, say).
   * Where every voice of a tuning unit (a bend channel, an MTS slot or key class) changes the
   * same way, the unit is retuned in place and the notes ring on; a held note that cannot be
   * retuned in place is struck again in its new tuning.
   */
  private respell(): void {
    const changes = new Map<number, Array<{ voice: Voice; pitch: SpelledPitch }>>();
    const unchanged = new Set<number>();
    for (const voice of this.sounding) {
      const pitch = this.setup.speller.peek(this.contextOf(voice.inputId, voice.velocity));
      const unit = this.setup.output.unitOf(voice.placement);
      if (samePitch(pitch, voice.pitch) || keyOf(pitch) !== keyOf(voice.pitch)) {
        unchanged.add(unit);
        continue;
      }
      changes.set(unit, [...(changes.get(unit) ?? []), { voice, pitch }]);
    }
    const table = this.tableNow();
    for (const [unit, list] of changes) {
      const first = list[0]!;
      const uniform = list.every((c) => c.pitch.fifths === first.pitch.fifths);
      if (!unchanged.has(unit) && uniform && unit >= 0 && this.setup.output.retune(first.voice.placement, table.tune(first.pitch), this.context)) {
        for (const c of list) c.voice.pitch = c.pitch;
        continue;
      }
      for (const { voice, pitch } of list) {
        if (!voice.keyDown) continue; // a note held only by the pedal cannot be struck again
        this.silence(voice, 0);
        this.down.delete(voice.inputId);
        this.end(voice);
        this.sound(voice.inputId, pitch, voice.velocity);
      }
    }
  }

  private keyUp(id: number, velocity: number): void {
    const voice = this.down.get(id);
    if (!voice) return;
    this.down.delete(id);
    const context = this.contextOf(id, velocity);
    this.setup.speller.noteOff(context);
    this.setup.observer?.({ type: 'key-up', time: this.now, source: context.source, inChannel: context.channel, inKey: context.key });
    if (voice.silenced) return;
    voice.keyDown = false;
    this.silence(voice, velocity);
    if (!this.sustain && !(this.sostenuto && voice.latched)) this.end(voice);
  }

  private contextOf(id: number, velocity: number): NoteContext {
    return { key: id % 128, velocity, time: this.now, channel: Math.floor(id / 128) % 16, source: Math.floor(id / 2048) };
  }

  /** Sends the note-off for a voice's synth key. */
  private silence(voice: Voice, velocity: number): void {
    if (this.owners.get(voice.slot) === voice) {
      this.owners.delete(voice.slot);
      this.emit(noteOff(voice.placement.channel, voice.placement.key, velocity));
    }
  }

  /**
   * A new note takes the synth key a held voice is sounding on (two inputs, one synth key): the
   * old one is released now, as if its key went up; its own key-up later does nothing.
   */
  private handOver(previous: Voice): void {
    this.silence(previous, 0);
    if (previous.keyDown) {
      previous.keyDown = false;
      previous.silenced = true;
    }
    if (!this.sustain && !(this.sostenuto && previous.latched)) this.end(previous);
  }

  private end(voice: Voice): void {
    if (!this.sounding.delete(voice)) return;
    this.setup.output.voiceEnded(voice.placement, this.now);
  }

  private endReleased(): void {
    for (const voice of [...this.sounding]) {
      if (!voice.keyDown && !this.sustain && !(this.sostenuto && voice.latched)) this.end(voice);
    }
  }

  /** Ends the matching voices at once: note-offs for keys still down (their key-ups then do nothing); no voiceEnded. */
  private killVoices(which: (p: Placement) => boolean): number {
    let count = 0;
    for (const voice of [...this.sounding]) {
      if (!which(voice.placement)) continue;
      this.silence(voice, 0);
      if (voice.keyDown) {
        voice.keyDown = false;
        voice.silenced = true;
      }
      this.sounding.delete(voice);
      count++;
    }
    return count;
  }

  private steal(which: (p: Placement) => boolean): void {
    const voices = this.killVoices(which);
    this.setup.observer?.({ type: 'steal', time: this.now, voices });
  }

  private reportOutOfRange(note: TunedNote, neededCents: number): void {
    this.stats.outOfRange++;
    this.setup.observer?.({ type: 'out-of-range', time: this.now, pitch: note.pitch, neededCents });
  }

  private toZone(controller: number, value: number): void {
    for (const c of this.setup.output.zoneChannels) this.emit(controlChange(c, controller, value));
  }

  private controller(channel: number, controller: number, value: number): void {
    switch (controller) {
      case CC.sustain:
        this.sustain = value >= 64;
        this.toZone(controller, value);
        if (!this.sustain) this.endReleased();
        return;
      case CC.sostenuto: {
        const down = value >= 64;
        if (down && !this.sostenuto) for (const v of this.sounding) v.latched = v.keyDown;
        this.sostenuto = down;
        this.toZone(controller, value);
        if (!down) {
          for (const v of this.sounding) v.latched = false;
          this.endReleased();
        }
        return;
      }
      case CC.rpnMsb:
      case CC.rpnLsb:
      case CC.nrpnMsb:
      case CC.nrpnLsb:
      case CC.dataEntry:
      case CC.dataEntryLsb:
      case CC.dataIncrement:
      case CC.dataDecrement:
        this.parameter(channel, controller, value);
        return;
      case CC.allSoundOff:
        for (const voice of this.sounding) this.setup.output.voiceEnded(voice.placement, this.now);
        this.killVoices(() => true);
        for (const c of this.everyChannel()) this.emit(controlChange(c, CC.allSoundOff, 0));
        return;
      case CC.resetAllControllers:
        this.sustain = false;
        this.sostenuto = false;
        this.wheelValue = BEND_CENTRE;
        this.toZone(controller, value);
        this.setup.output.reassert((d) => this.emit(d));
        this.endReleased();
        return;
      case CC.localControl:
        return; // meant for the keyboard's own sound, not for the synth behind diesis
      case CC.allNotesOff:
      case CC.omniOff:
      case CC.omniOn:
      case CC.monoOn:
      case CC.polyOn:
        // All four mode messages also mean All Notes Off (MIDI 1.0); they are not forwarded.
        for (const id of [...this.down.keys()]) this.keyUp(id, 0);
        if (controller === CC.allNotesOff) for (const c of this.everyChannel()) this.emit(controlChange(c, CC.allNotesOff, 0));
        return;
      default:
        this.toZone(controller, value);
    }
  }

  /**
   * Registered parameters from the keyboard are consumed (they would change the synth's bend
   * ranges); RPN 0 sets the wheel range. Non-registered ones pass through to the zone.
   */
  private parameter(channel: number, controller: number, value: number): void {
    const state = this.params.get(channel) ?? { selection: 'none' as ParamSelection, msb: 127, lsb: 127 };
    this.params.set(channel, state);
    if (controller === CC.rpnMsb || controller === CC.rpnLsb) {
      if (controller === CC.rpnMsb) state.msb = value;
      else state.lsb = value;
      state.selection = state.msb === 127 && state.lsb === 127 ? 'none' : 'rpn';
      return;
    }
    if (controller === CC.nrpnMsb || controller === CC.nrpnLsb) {
      state.selection = 'nrpn';
      this.toZone(controller, value);
      return;
    }
    if (state.selection === 'nrpn') {
      this.toZone(controller, value);
      return;
    }
    if (state.selection === 'rpn' && state.msb === 0 && state.lsb === 0) {
      const cents = Math.round((this.wheelRange % 1) * 100);
      if (controller === CC.dataEntry) this.wheelRange = value + cents / 100;
      else if (controller === CC.dataEntryLsb) this.wheelRange = Math.floor(this.wheelRange) + Math.min(value, 99) / 100;
      if (this.wheelRange <= 0) this.wheelRange = 0.01;
    }
  }

  private everyChannel(): number[] {
    return [...new Set([...this.setup.output.allChannels, ...this.setup.output.zoneChannels])];
  }

  private doPanic(reason: string): void {
    this.pending = [];
    for (const voice of this.sounding) this.silence(voice, 0);
    for (const id of this.down.keys()) this.setup.speller.noteOff(this.contextOf(id, 0));
    this.owners.clear();
    this.down.clear();
    this.sounding.clear();
    this.sustain = false;
    this.sostenuto = false;
    this.wheelValue = BEND_CENTRE;
    for (const c of this.everyChannel()) {
      this.emit(controlChange(c, CC.sustain, 0));
      this.emit(controlChange(c, CC.sostenuto, 0));
      this.emit(controlChange(c, CC.soft, 0));
      this.emit(controlChange(c, CC.allNotesOff, 0));
    }
    this.setup.output.panic((d) => this.emit(d));
    this.setup.observer?.({ type: 'panic', time: this.now, reason });
  }
}

function inputId(source: number, channel: number, key: number): number {
  return source * 2048 + channel * 128 + key;
}
