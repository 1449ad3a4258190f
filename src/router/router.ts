import { CC, channelPressure, controlChange, noteOff, noteOn, polyPressure, programChange, type TimedMessage } from '../midi/bytes.js';
import { decodeMessage, type MidiMessage } from '../midi/message.js';
import { MidiStreamParser } from '../midi/parser.js';
import { BEND_CENTRE } from '../midi/pitch-bend.js';
import { keyOf, spellKey, type PitchClass, type SpelledPitch } from '../pitch/index.js';
import type { ControlMap, EngineActions, Firing } from '../spelling/control-map.js';
import { ControlledSpeller } from '../spelling/controlled.js';
import type { NoteContext, Speller } from '../spelling/speller.js';
import type { AdaptedTunedNote } from './adaptive-pitches.js';
import { ChordGatherer, type GatherSetting } from './chord-gatherer.js';
import type { RouterEvent } from './events.js';
import { isParameterController, KeyboardState } from './keyboard-state.js';
import { channelOf, keyOfNote, noteId, sourceOf, type NoteId } from '../midi/note-id.js';
import type { OutputContext, OutputStrategy } from './output.js';
import type { PitchTable } from './pitch-table.js';
import { planRespelling } from './respell.js';
import type { PieceChange, PieceOutputChange, PieceSource } from './pieces.js';
import { TuningInForce, type TuningChange } from './tuning-in-force.js';
import { VoiceBook } from './voice-book.js';

export type { RouterEvent } from './events.js';

/** Silence after an active-sensing byte that means the sender is gone (MIDI 1.0). */
export const ACTIVE_SENSING_TIMEOUT_MS = 300;

export interface RouterSetup {
  readonly table: PitchTable;
  readonly speller: Speller;
  readonly output: OutputStrategy;
  /** Initial wheel range of the player's keyboard in semitones; RPN 0 from the keyboard changes it. */
  readonly wheelRange: number;
  /** The player's pedals, key switches and program changes bound to actions. */
  readonly controls?: ControlMap | undefined;
  readonly gather?: GatherSetting | undefined;
  /** The tuning's id and name, for the events a tuning change sends. */
  readonly tuningAbout?: { readonly id: string; readonly name: string } | undefined;
  /** A concert programme: where next-piece and previous-piece lead. */
  readonly pieces?: PieceSource | undefined;
  /** The output's release guard: a piece's new output takes over only this long after the last note ended. */
  readonly releaseGuardMs?: number | undefined;
  /** Hears every decision; displays, logs, reports and counters are folds over these events. */
  readonly observer?: ((event: RouterEvent) => void) | undefined;
}

interface InputStream {
  readonly parser: MidiStreamParser;
  readonly onMessage: (data: number[]) => void;
}

/**
 * The engine: raw MIDI in with timestamps, raw MIDI out with timestamps; no I/O, no clock. It
 * decodes each message once, spells notes (the speller), tunes them (the pitch table), places them
 * (the output strategy) and keeps them in the voice book, so that every note it starts is ended:
 * on key up, on pedal up, on All Notes Off, when a device goes away, on an active-sensing timeout
 * and on panic. It only orchestrates: each piece of state has one owner.
 */
export class Router {
  private readonly inputs = new Map<number, InputStream>();
  private readonly book: VoiceBook;
  private readonly keyboard: KeyboardState;
  private readonly gatherer: ChordGatherer;
  private readonly context: OutputContext;
  private readonly actions: EngineActions;
  private everyChannel: readonly number[];
  /** The output in force: a piece's output settings replace it once nothing sounds. */
  private output: OutputStrategy;
  private pendingOutput: PieceOutputChange | undefined;
  /** The release guard of the output in force, and when the last voice ended: a new output waits for both. */
  private outputGuardMs: number;
  private lastVoiceEnd = Number.NEGATIVE_INFINITY;
  /** The tuning and reference new notes take (a set-tuning control or a new piece changes them). */
  private readonly tuning: TuningInForce;
  private readonly observe: ((event: RouterEvent) => void) | undefined;
  private out: TimedMessage[] = [];
  private now = 0;
  private passThrough = false;
  private sensing = false;
  private lastInput = 0;
  /** Channels that carried notes, and whether zone-wide messages were sent (for closing a file). */
  private readonly channelsUsed = new Set<number>();
  private zoneUsed = false;
  /** The speller's tonic, asked only when a just table must follow it. */
  private readonly tonic = (): PitchClass | undefined => this.setup.speller.currentTonic();
  /** Why the output could not place the note being sounded, if it said. */
  private refusal: string | undefined;

  constructor(private readonly setup: RouterSetup) {
    const observe = (this.observe = setup.observer);
    const output = (this.output = setup.output);
    this.outputGuardMs = setup.releaseGuardMs ?? 0;
    this.keyboard = new KeyboardState(setup.wheelRange);
    const tuning = (this.tuning = new TuningInForce(setup.table, setup.tuningAbout));
    this.gatherer = new ChordGatherer(setup.gather ?? 0);
    this.everyChannel = [...new Set([...output.allChannels, ...output.zoneChannels])];
    const book = (this.book = new VoiceBook({
      noteOff: (voice, velocity) => this.emit(noteOff(voice.placement.channel, voice.placement.key, velocity)),
      ended: (voice, cause) => {
        if (cause !== 'stolen' && cause !== 'panic') this.output.voiceEnded(voice.placement, this.now);
        this.lastVoiceEnd = this.now;
        tuning.adaptive?.ended(this.now, voice.id);
        observe?.({ type: 'voice-ended', time: this.now, id: voice.id, placement: voice.placement, cause });
      },
    }));
    this.context = {
      emit: (data) => this.emit(data),
      retuned: () => observe?.({ type: 'retune', time: this.now }),
      steal: (which) => {
        const cut = this.book.cut((v) => which(v.placement), 'stolen');
        observe?.({ type: 'steal', time: this.now, ids: cut.map((v) => v.id) });
      },
      outOfRange: (note, neededCents) => observe?.({ type: 'out-of-range', time: this.now, pitch: note.pitch, neededCents }),
      get pedalDown() {
        return book.sustainDown || book.sostenutoDown;
      },
      refuse: (reason) => (this.refusal = reason),
      tableInForce: () => this.tuning.tables.now(this.passThrough, this.tonic),
    };
    this.actions = {
      respell: () => this.respell(),
      togglePass: () => {
        this.passThrough = !this.passThrough;
        observe?.({ type: 'pass', time: this.now, on: this.passThrough });
      },
      panic: () => this.doPanic('panic control', this.everyChannel),
      setTuning: (change) => this.changeTuning(change),
      stepPiece: (step) => {
        const change = this.setup.pieces?.step(step);
        if (change) this.changePiece(change);
      },
    };
  }

  /** The tuning new notes take now, its reference, and its id and name. */
  get tuningInForce(): Pick<TuningInForce, 'tuning' | 'reference' | 'id' | 'name'> {
    return this.tuning;
  }

  /** Moves to a piece of the programme (the first piece, a resumed concert); false if there is none there. */
  goToPiece(time: number, index: number): { messages: TimedMessage[]; moved: boolean } {
    this.begin(time);
    this.flushChord();
    const change = this.setup.pieces?.at(index);
    if (change) this.changePiece(change);
    return { messages: this.done(), moved: change !== undefined };
  }

  /** New notes take `change`; notes sounding finish in the tuning they began in. */
  private changeTuning(change: TuningChange): void {
    this.tuning.change(change);
    this.observe?.({ type: 'tuning', time: this.now, tuningId: change.id, name: change.name, tuning: this.tuning.tuning, reference: this.tuning.reference });
  }

  /** A new piece: its tuning, its spelling (a fresh strategy, its score from the beginning) and its key. */
  private changePiece(change: PieceChange): void {
    const speller = this.setup.speller;
    if (speller instanceof ControlledSpeller) speller.replaceBase(change.spelling.base, change.spelling.key);
    this.changeTuning(change.tuning);
    if (change.output) {
      this.pendingOutput = change.output;
      if (this.outputFree()) this.swapOutput(false);
      else this.observe?.({ type: 'output', time: this.now, waiting: true });
    }
    this.observe?.({ type: 'piece', time: this.now, index: change.index, count: change.count, title: change.title, strategy: change.spelling.strategy });
  }

  /**
   * A piece's output settings (bend range, channels, release guard…) take over only when nothing
   * sounds and the release guard has passed since the last note ended: changed under a note or its
   * release tail they would move it. Until then new notes go to the
   * output in force, in the new tuning. The new output's set-up messages go out as it takes over;
   * panic still covers the channels of every output used.
   */
  private swapOutput(waited: boolean): void {
    const change = this.pendingOutput;
    if (!change) return;
    this.pendingOutput = undefined;
    const next = (this.output = change.strategy);
    this.outputGuardMs = change.releaseGuardMs;
    this.everyChannel = [...new Set([...this.everyChannel, ...next.allChannels, ...next.zoneChannels])];
    next.start(this.context);
    if (this.keyboard.wheelValue !== BEND_CENTRE) next.wheel(this.keyboard.wheelValue, this.keyboard.wheelRange, this.now, this.context);
    this.observe?.({ type: 'output', time: this.now, waiting: false, waited });
  }

  private outputFree(): boolean {
    return this.book.size === 0 && this.now - this.lastVoiceEnd >= this.outputGuardMs;
  }

  /** True while new notes sound in 12-ET at the reference (the pass control, for comparison). */
  get passing(): boolean {
    return this.passThrough;
  }

  get sustainDown(): boolean {
    return this.book.sustainDown;
  }

  get sostenutoDown(): boolean {
    return this.book.sostenutoDown;
  }

  /** How many voices sound now (keys down plus those held by pedals). */
  get soundingCount(): number {
    return this.book.size;
  }

  private emit(data: number[]): void {
    this.out.push({ time: this.now, data });
  }

  private begin(time: number): void {
    this.now = time;
    this.out = [];
  }

  private done(): TimedMessage[] {
    if (this.pendingOutput && this.outputFree()) this.swapOutput(true);
    const result = this.out;
    this.out = [];
    return result;
  }

  /** The messages that set a synth up: send at start and whenever the output port (re)appears. */
  start(time: number): TimedMessage[] {
    this.begin(time);
    this.output.start(this.context);
    return this.done();
  }

  /** Feeds input bytes from one source (a device); any bytes at all, whole messages or not. */
  process(time: number, bytes: ArrayLike<number>, source = 0): TimedMessage[] {
    this.begin(time);
    const input = this.inputOf(source);
    const droppedBefore = input.parser.dropped;
    input.parser.feed(bytes, input.onMessage);
    const dropped = input.parser.dropped - droppedBefore;
    if (dropped > 0) this.observe?.({ type: 'malformed', time, source, bytes: dropped });
    return this.done();
  }

  /** Runs an action exactly as a bound control would (a page button, a programme step). */
  act(time: number, firing: Firing): TimedMessage[] {
    this.begin(time);
    this.flushChord();
    this.setup.controls?.run([firing], this.actions);
    return this.done();
  }

  /** Spells and sounds a chord still being gathered (files call it when the next onset time begins). */
  flush(time: number): TimedMessage[] {
    this.begin(time);
    this.flushChord();
    return this.done();
  }

  /** Lets time pass without input: chord gathering and the active-sensing timeout. Call every few ms live. */
  tick(time: number): TimedMessage[] {
    this.begin(time);
    const due = this.gatherer.dueAt();
    if (due !== undefined && time >= due) {
      this.now = due; // the chord sounds when its gathering time is up, not when the tick came
      this.flushChord();
      this.now = time;
    }
    if (this.sensing && time - this.lastInput > ACTIVE_SENSING_TIMEOUT_MS) {
      this.sensing = false;
      this.doPanic('active sensing stopped', this.everyChannel);
    }
    return this.done();
  }

  /** Ends every sounding note, lifts pedals, sends All Notes Off and centres the bends used. */
  panic(time: number, reason = 'panic'): TimedMessage[] {
    this.begin(time);
    this.doPanic(reason, this.everyChannel);
    return this.done();
  }

  /**
   * Closes a file: the panic sequence on the channels it used (notes, or zone-wide messages) only.
   * Live, a panic covers every channel, since the synth may hold what diesis never sent.
   */
  close(time: number, reason = 'end of file'): TimedMessage[] {
    this.begin(time);
    const zone = this.zoneUsed ? this.output.zoneChannels : [];
    this.doPanic(reason, this.everyChannel.filter((c) => this.channelsUsed.has(c) || zone.includes(c)));
    return this.done();
  }

  /** Lets go of every key and lifts the pedals, as a player would at the end: release tails ring on. */
  releaseAll(time: number): TimedMessage[] {
    this.begin(time);
    this.flushChord();
    for (const id of this.book.keysDown()) this.keyUp(id, 0);
    const pedals = this.book.pedalSources();
    for (const source of pedals.sustain) this.pedal(source, CC.sustain, 0);
    for (const source of pedals.sostenuto) this.pedal(source, CC.sostenuto, 0);
    return this.done();
  }

  /** A source (device) went away: its pedals are lifted and every note it holds, keyed or pedalled, ends at once. */
  releaseSource(time: number, source: number): TimedMessage[] {
    this.begin(time);
    this.flushChord();
    this.inputs.get(source)?.parser.reset();
    this.keyboard.forgetSource(source);
    const keys = this.book.keysDown().filter((id) => sourceOf(id) === source);
    const changed = this.book.removeSource(source);
    for (const id of keys) this.heardKeyUp(id, 0);
    if (changed.heldElsewhere) {
      // Another device's pedal holds some of its notes in the synth, where only lifting the pedal
      // ends them: lift it, end every pedal-held voice, and put the pedals that are down back.
      this.toZone(CC.sustain, 0);
      this.toZone(CC.sostenuto, 0);
      this.book.repedal('source-gone');
      if (this.book.sustainDown) this.toZone(CC.sustain, 127);
      if (this.book.sostenutoDown) this.toZone(CC.sostenuto, 127);
    } else {
      if (changed.sustain) this.toZone(CC.sustain, 0);
      if (changed.sostenuto) this.toZone(CC.sostenuto, 0);
    }
    return this.done();
  }

  private inputOf(source: number): InputStream {
    let input = this.inputs.get(source);
    if (!input) {
      input = { parser: new MidiStreamParser(), onMessage: (data) => this.handle(decodeMessage(data), source) };
      this.inputs.set(source, input);
    }
    return input;
  }

  private handle(message: MidiMessage, source: number): void {
    if (message.kind === 'active-sensing') {
      this.sensing = true;
      this.lastInput = this.now;
      return;
    }
    this.lastInput = this.now;
    if (message.kind === 'system') {
      this.emit([...message.data]); // system exclusive, common and real-time pass through
      return;
    }
    const fired = this.setup.controls?.intercept(message, source);
    if (fired) {
      this.flushChord();
      this.setup.controls?.run(fired, this.actions);
      return;
    }
    if (message.kind === 'note-on') {
      this.gatherNote(noteId(source, message.channel, message.key), message.velocity);
      return;
    }
    this.flushChord();
    switch (message.kind) {
      case 'note-off':
        this.keyUp(noteId(source, message.channel, message.key), message.velocity);
        return;
      case 'poly-pressure': {
        const voice = this.book.voiceOfKey(noteId(source, message.channel, message.key));
        if (voice && !voice.silenced) this.emit(polyPressure(voice.placement.channel, voice.placement.key, message.value));
        return;
      }
      case 'control':
        this.controller(source, message.channel, message.controller, message.value);
        return;
      case 'program':
        this.zoneUsed = true;
        for (const c of this.output.zoneChannels) this.emit(programChange(c, message.program));
        return;
      case 'channel-pressure':
        this.zoneUsed = true;
        for (const c of this.output.zoneChannels) this.emit(channelPressure(c, message.value));
        return;
      case 'pitch-bend':
        this.keyboard.wheelValue = message.value;
        this.output.wheel(message.value, this.keyboard.wheelRange, this.now, this.context);
        return;
    }
  }

  private gatherNote(id: NoteId, velocity: number): void {
    if (this.gatherer.closesAt(this.now)) this.flushChord();
    if (this.gatherer.add(this.now, { id, velocity })) this.flushChord();
  }

  /** Spells the notes gathered so far as one chord and sounds them. */
  private flushChord(): void {
    if (this.gatherer.empty) return;
    const notes = this.gatherer.take();
    for (const n of notes) if (this.book.isDown(n.id)) this.keyUp(n.id, 0); // a second note-on without its note-off: release the first
    const speller = this.setup.speller;
    const spelled = speller.spell(notes.map((n) => this.contextOf(n.id, n.velocity)));
    let pitches = spelled;
    for (let i = 0; i < notes.length; i++) {
      const key = keyOfNote(notes[i]!.id);
      const pitch = spelled[i];
      if (pitch !== undefined && keyOf(pitch) === key) continue;
      if (pitches === spelled) pitches = [...spelled]; // never trust a speller blindly, nor change what it returned
      pitches[i] = spellKey(speller.currentWindow(), key);
    }
    const adaptive = this.tuning.adaptive;
    if (adaptive && !this.passThrough) {
      adaptive.setTonic(speller.declaredTonic?.());
      const tuned = adaptive.tuneChord(this.now, notes.map((n, i) => ({ id: n.id, pitch: pitches[i]! })));
      notes.forEach((n, i) => this.sound(n.id, pitches[i]!, n.velocity, tuned[i]));
      return;
    }
    for (let i = 0; i < notes.length; i++) this.sound(notes[i]!.id, pitches[i]!, notes[i]!.velocity);
  }

  /** Tunes, places and starts one note (as the output can sound it: a sample set may lack a spelling). */
  private sound(id: NoteId, wanted: SpelledPitch, velocity: number, adapted?: AdaptedTunedNote): void {
    const output = this.output;
    const pitch = output.available ? output.available(wanted) : wanted;
    const tuned = adapted ?? this.tuning.tables.now(this.passThrough, this.tonic).tune(pitch);
    this.refusal = undefined;
    const placement = output.place(tuned, this.now, this.context);
    if (!placement) {
      this.observe?.({ type: 'note-dropped', time: this.now, id, pitch, reason: this.refusal ?? 'its tuned key lies outside 0…127' });
      return;
    }
    this.channelsUsed.add(placement.channel);
    this.book.start({ id, pitch, velocity, placement, state: 'held', silenced: false }); // releases a voice on the same synth key first
    this.emit(noteOn(placement.channel, placement.key, velocity));
    const adaptive = adapted && { fromTable: adapted.fromTable, compromise: adapted.compromise };
    this.observe?.({ type: 'note', time: this.now, id, velocity, pitch, wanted: pitch === wanted ? undefined : wanted, hz: tuned.hz, cents: tuned.etCents, placement, adaptive });
  }

  private keyUp(id: NoteId, velocity: number): void {
    if (this.book.keyUp(id, velocity)) this.heardKeyUp(id, velocity);
  }

  private heardKeyUp(id: NoteId, velocity: number): void {
    this.setup.speller.noteOff(this.contextOf(id, velocity));
    this.observe?.({ type: 'key-up', time: this.now, id });
  }

  private contextOf(id: NoteId, velocity: number): NoteContext {
    return { key: keyOfNote(id), velocity, time: this.now, channel: channelOf(id), source: sourceOf(id) };
  }

  /** Respells what sounds now with the context as it is: units retuned in place where they can be, else struck again. */
  private respell(): void {
    const output = this.output;
    const plan = planRespelling(this.book.voices(), (v) => this.setup.speller.peek(this.contextOf(v.id, v.velocity)), output.inPlace);
    const table = this.tuning.tables.now(this.passThrough, this.tonic);
    const restrike = [...plan.restrike];
    for (const unit of plan.retune) {
      const first = unit[0]!;
      if (output.inPlace?.retune(first.voice.placement, table.tune(first.pitch), this.context)) for (const c of unit) c.voice.pitch = c.pitch;
      else restrike.push(...unit);
    }
    for (const { voice, pitch } of restrike) {
      if (voice.state !== 'held') continue; // a note held only by the pedal cannot be struck again
      this.book.cut((v) => v === voice, 'respelled');
      this.sound(voice.id, pitch, voice.velocity);
    }
  }

  private toZone(controller: number, value: number): void {
    this.zoneUsed = true;
    for (const c of this.output.zoneChannels) this.emit(controlChange(c, controller, value));
  }

  /** A sustain or sostenuto pedal of one source; the synth hears the pedals' combined state. */
  private pedal(source: number, controller: typeof CC.sustain | typeof CC.sostenuto, value: number): void {
    const down = value >= 64;
    const sustain = controller === CC.sustain;
    const changed = sustain ? this.book.sustain(source, down) : this.book.sostenuto(source, down);
    const anyDown = sustain ? this.book.sustainDown : this.book.sostenutoDown;
    if (down || !anyDown) this.toZone(controller, value); // another device's pedal still down: keep the synth's down
    if (changed) this.observe?.({ type: 'pedal', time: this.now, pedal: sustain ? 'sustain' : 'sostenuto', down: anyDown });
  }

  private controller(source: number, channel: number, controller: number, value: number): void {
    if (isParameterController(controller)) {
      const effect = this.keyboard.parameter(source, channel, controller, value);
      if (effect === 'forward') this.toZone(controller, value);
      else if (effect === 'wheel-range') this.output.wheel(this.keyboard.wheelValue, this.keyboard.wheelRange, this.now, this.context);
      return;
    }
    switch (controller) {
      case CC.sustain:
      case CC.sostenuto:
        this.pedal(source, controller, value);
        return;
      case CC.allSoundOff:
        this.book.cut(() => true, 'cut');
        for (const c of this.everyChannel) this.emit(controlChange(c, CC.allSoundOff, 0));
        return;
      case CC.resetAllControllers:
        this.resetControllers(source);
        return;
      case CC.localControl:
        return; // meant for the keyboard's own sound, not for the synth behind diesis
      case CC.allNotesOff:
      case CC.omniOff:
      case CC.omniOn:
      case CC.monoOn:
      case CC.polyOn:
        // All four mode messages also mean All Notes Off (MIDI 1.0); they are not forwarded.
        for (const id of this.book.keysDown()) this.keyUp(id, 0);
        if (controller === CC.allNotesOff) for (const c of this.everyChannel) this.emit(controlChange(c, CC.allNotesOff, 0));
        return;
      default:
        this.toZone(controller, value);
    }
  }

  /**
   * Reset All Controllers, translated: forwarded as it is it would centre every channel's bend and
   * drop sounding notes to 12-ET, so the synth gets its other effects (RP-015: modulation 0,
   * expression 127, pedals up, channel pressure 0) and the wheel is centred through the output,
   * which keeps the tuning bends.
   */
  private resetControllers(source: number): void {
    for (const [controller, value] of RESET_EFFECTS) this.toZone(controller, value);
    for (const c of this.output.zoneChannels) this.emit(channelPressure(c, 0));
    this.pedal(source, CC.sustain, 0);
    this.pedal(source, CC.sostenuto, 0);
    this.keyboard.wheelValue = BEND_CENTRE;
    this.output.wheel(BEND_CENTRE, this.keyboard.wheelRange, this.now, this.context);
  }

  private doPanic(reason: string, channels: readonly number[]): void {
    this.gatherer.take();
    for (const id of this.book.clear()) this.heardKeyUp(id, 0);
    this.keyboard.wheelValue = BEND_CENTRE;
    for (const c of channels) {
      this.emit(controlChange(c, CC.sustain, 0));
      this.emit(controlChange(c, CC.sostenuto, 0));
      this.emit(controlChange(c, CC.soft, 0));
      this.emit(controlChange(c, CC.allNotesOff, 0));
    }
    this.output.panic(this.context, this.now);
    this.tuning.adaptive?.reset();
    this.observe?.({ type: 'panic', time: this.now, reason });
  }
}

/** The controllers Reset All Controllers sets (RP-015), other than the pedals and the bend. */
const RESET_EFFECTS: ReadonlyArray<readonly [number, number]> = [
  [1, 0], // modulation
  [11, 127], // expression
  [65, 0], // portamento
  [CC.soft, 0],
  [CC.rpnMsb, 127], // null RPN
  [CC.rpnLsb, 127],
];

