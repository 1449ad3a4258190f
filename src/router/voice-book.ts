import type { SpelledPitch } from '../pitch/index.js';
import { sourceOf, type NoteId } from '../midi/note-id.js';
import type { Placement } from './output.js';

/**
 * `held`: its key is down. `pedal`: its key is up (or its synth key was handed to a newer note)
 * and a pedal holds it. `ended`: it no longer sounds.
 */
export type VoiceState = 'held' | 'pedal' | 'ended';

/** Why a voice stopped sounding. */
export type EndCause = 'released' | 'cut' | 'stolen' | 'respelled' | 'source-gone' | 'panic';

export interface Voice {
  readonly id: NoteId;
  /** Its spelling; respelling in place changes it. */
  pitch: SpelledPitch;
  readonly velocity: number;
  readonly placement: Placement;
  state: VoiceState;
  /** Its synth note has had its note-off (key up, stolen, or its synth key taken by a newer note). */
  silenced: boolean;
}

/** What the book asks of its owner; the book itself never sends bytes. */
export interface VoiceListener {
  /** Send the note-off of this voice's synth key. */
  noteOff(voice: Voice, velocity: number): void;
  /** The voice stopped sounding. */
  ended(voice: Voice, cause: EndCause): void;
}

const slotOf = (p: Placement): number => p.channel * 128 + p.key;

/**
 * The book of voices: which keys are down, which voices sound, who owns each synth key, and the
 * pedals that hold released voices. Pedals are kept per input source (a pedal box and a keyboard
 * may each have one), so a device that goes away takes its pedals with it. One rule decides
 * whether a released voice rings on: `heldByPedal`.
 */
export class VoiceBook {
  /** Keys physically down, each with the voice it started. */
  private readonly keys = new Map<NoteId, Voice>();
  private readonly sounding = new Set<Voice>();
  /** The newest voice on each synth key (channel·128 + key) whose note-off has not been sent. */
  private readonly owners = new Map<number, Voice>();
  private readonly sustainBy = new Set<number>();
  private readonly sostenutoBy = new Set<number>();
  /**
   * The voices the sostenuto holds: those held when the first sostenuto went down. The synth has
   * one sostenuto, so the latch follows the pedals' combined state, as the synth's does.
   */
  private latched = new Set<Voice>();

  constructor(private readonly listener: VoiceListener) {}

  /** How many voices sound (keys down and voices held by pedals). */
  get size(): number {
    return this.sounding.size;
  }

  get sustainDown(): boolean {
    return this.sustainBy.size > 0;
  }

  get sostenutoDown(): boolean {
    return this.sostenutoBy.size > 0;
  }

  isDown(id: NoteId): boolean {
    return this.keys.has(id);
  }

  /** The voice a key that is down started. */
  voiceOfKey(id: NoteId): Voice | undefined {
    return this.keys.get(id);
  }

  /** The voices sounding now (a copy: safe to change the book while iterating). */
  voices(): Voice[] {
    return [...this.sounding];
  }

  /** Keys down, in the order they went down. */
  keysDown(): NoteId[] {
    return [...this.keys.keys()];
  }

  private heldVoices(): Set<Voice> {
    return new Set([...this.sounding].filter((v) => v.state === 'held'));
  }

  /** The one rule: a voice whose key is up rings on while a sustain pedal is down or a sostenuto latched it. */
  heldByPedal(voice: Voice): boolean {
    if (this.sustainBy.size > 0) return true;
    return this.latched.has(voice);
  }

  /** Books a voice that has just been sent its note-on; a voice that owned the same synth key is released first. */
  start(voice: Voice): void {
    const slot = slotOf(voice.placement);
    const previous = this.owners.get(slot);
    if (previous) this.release(previous, 0);
    this.owners.set(slot, voice);
    this.keys.set(voice.id, voice);
    this.sounding.add(voice);
  }

  /** A key went up: its voice gets its note-off and ends unless a pedal holds it. Returns the voice, if the key was down. */
  keyUp(id: NoteId, velocity: number): Voice | undefined {
    const voice = this.keys.get(id);
    if (!voice) return undefined;
    this.keys.delete(id);
    if (voice.state === 'held') this.release(voice, velocity);
    return voice;
  }

  /** Silences a held voice (its synth note ends) and lets the pedals decide whether it still sounds. */
  private release(voice: Voice, velocity: number): void {
    this.silence(voice, velocity);
    if (voice.state !== 'held') return;
    if (this.heldByPedal(voice)) voice.state = 'pedal';
    else this.end(voice, 'released');
  }

  private silence(voice: Voice, velocity: number): void {
    if (voice.silenced) return;
    voice.silenced = true;
    const slot = slotOf(voice.placement);
    if (this.owners.get(slot) === voice) this.owners.delete(slot);
    this.listener.noteOff(voice, velocity);
  }

  private end(voice: Voice, cause: EndCause): void {
    if (!this.sounding.delete(voice)) return;
    voice.state = 'ended';
    this.latched.delete(voice);
    this.listener.ended(voice, cause);
  }

  /** Ends every released voice no pedal holds any more. */
  private endUnheld(): void {
    for (const voice of this.voices()) if (voice.state === 'pedal' && !this.heldByPedal(voice)) this.end(voice, 'released');
  }

  /** One source's sustain pedal; returns whether "any sustain down" changed. */
  sustain(source: number, down: boolean): boolean {
    const before = this.sustainBy.size > 0;
    if (down) this.sustainBy.add(source);
    else this.sustainBy.delete(source);
    if (!down) this.endUnheld();
    return before !== this.sustainBy.size > 0;
  }

  /** One source's sostenuto pedal: going down latches the voices held now. Returns whether "any sostenuto down" changed. */
  sostenuto(source: number, down: boolean): boolean {
    const before = this.sostenutoBy.size > 0;
    if (down) this.sostenutoBy.add(source);
    else this.sostenutoBy.delete(source);
    const after = this.sostenutoBy.size > 0;
    if (!before && after) this.latched = this.heldVoices();
    if (before && !after) {
      this.latched = new Set();
      this.endUnheld();
    }
    return before !== after;
  }

  /**
   * A source went away: its pedals are lifted, and every voice it started ends at once, keys down
   * or held by any pedal. Returns which pedals' combined state changed, and whether another
   * device's pedal still holds one of those voices in the synth (a note-off cannot end it there).
   */
  removeSource(source: number): { sustain: boolean; sostenuto: boolean; heldElsewhere: boolean } {
    for (const [id, voice] of this.keys) {
      if (sourceOf(id) !== source) continue;
      this.keys.delete(id);
      this.silence(voice, 0);
    }
    const gone = this.voices().filter((v) => sourceOf(v.id) === source);
    const sustain = this.sustain(source, false);
    const sostenuto = this.sostenuto(source, false);
    let heldElsewhere = false;
    for (const voice of gone) {
      if (voice.state === 'ended') continue;
      heldElsewhere ||= this.heldByPedal(voice);
      this.end(voice, 'source-gone');
    }
    return { sustain, sostenuto, heldElsewhere };
  }

  /**
   * The synth's pedals are lifted and put down again: every voice a pedal holds ends, and a
   * sostenuto that goes down again latches the keys held now, as the synth's will.
   */
  repedal(cause: EndCause): void {
    for (const voice of this.voices()) if (voice.state === 'pedal') this.end(voice, cause);
    this.latched = this.sostenutoBy.size > 0 ? this.heldVoices() : new Set();
  }

  /** Every pedal's source, for lifting them all. */
  pedalSources(): { sustain: number[]; sostenuto: number[] } {
    return { sustain: [...this.sustainBy], sostenuto: [...this.sostenutoBy] };
  }

  /**
   * Ends the matching voices at once (a steal, All Sound Off): note-offs for those still keyed;
   * their later key-ups do nothing. Returns the voices ended.
   */
  cut(which: (voice: Voice) => boolean, cause: EndCause): Voice[] {
    const cut: Voice[] = [];
    for (const voice of this.voices()) {
      if (!which(voice)) continue;
      this.silence(voice, 0);
      this.end(voice, cause);
      cut.push(voice);
    }
    return cut;
  }

  /** Panic: note-offs for everything, every voice ended, keys and pedals forgotten. */
  clear(): NoteId[] {
    const keys = this.keysDown();
    this.cut(() => true, 'panic');
    this.keys.clear();
    this.owners.clear();
    this.sustainBy.clear();
    this.sostenutoBy.clear();
    this.latched = new Set();
    return keys;
  }
}
