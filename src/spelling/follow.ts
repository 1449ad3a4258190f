import { keyboardWindow, nearestSpelling, onKey, type KeyboardWindow, type SpelledPitch } from '../pitch/index.js';
import { mod } from '../util/errors.js';
import type { NoteContext, Speller } from './speller.js';

/** Parameters of the following speller (all have defaults; the setup file may change them). */
export interface FollowParameters {
  /** Half-life of a note's weight in the running centre, in milliseconds. */
  readonly halfLifeMs: number;
  /** Extra weight of each note still held, relative to a fresh note. */
  readonly heldWeight: number;
  /** Fifths a chroma's new nearest spelling must win by before it replaces the last one used. */
  readonly hysteresis: number;
  /** Where the centre starts, in fifths (2 ≈ between C and A: the middle of E♭..G♯). */
  readonly initialCentre: number;
  /** Weight of the starting centre, as if that many notes had been heard there. */
  readonly initialWeight: number;
}

export const DEFAULT_FOLLOW: FollowParameters = {
  halfLifeMs: 2500,
  heldWeight: 1,
  hysteresis: 0.5,
  initialCentre: 2,
  initialWeight: 2,
};

/**
 * Follows the harmony: a causal, time-decayed centre of the notes heard and held, on the line of
 * fifths (the family of Longuet-Higgins's, Temperley's and Chew & Chen's spellers). Each new note
 * takes the spelling of its key nearest the centre; a key keeps its last spelling unless the new
 * one is nearer by more than the hysteresis, so spellings do not flap when the centre sits
 * between two. Notes that begin together are spelled as one compact group.
 */
export class FollowSpeller implements Speller {
  private sum: number;
  private weight: number;
  private lastTime = 0;
  private readonly held = new Map<number, number>();
  private readonly lastSpelling = new Map<number, number>();

  constructor(private readonly p: FollowParameters = DEFAULT_FOLLOW) {
    this.sum = p.initialCentre * p.initialWeight;
    this.weight = p.initialWeight;
  }

  private decayTo(time: number): void {
    if (time > this.lastTime) {
      const factor = 0.5 ** ((time - this.lastTime) / this.p.halfLifeMs);
      this.sum *= factor;
      this.weight *= factor;
      this.lastTime = time;
    }
  }

  /** The current centre on the line of fifths. */
  centre(): number {
    let sum = this.sum;
    let weight = this.weight;
    for (const f of this.held.values()) {
      sum += this.p.heldWeight * f;
      weight += this.p.heldWeight;
    }
    return weight > 0 ? sum / weight : this.p.initialCentre;
  }

  private choose(chroma: number, centre: number): number {
    const nearest = nearestSpelling(chroma, centre).fifths;
    const last = this.lastSpelling.get(chroma);
    if (last === undefined || last === nearest) return nearest;
    return Math.abs(nearest - centre) + this.p.hysteresis < Math.abs(last - centre) ? nearest : last;
  }

  spell(notes: readonly NoteContext[]): SpelledPitch[] {
    if (notes.length === 0) return [];
    this.decayTo(notes[0]!.time);
    const centre = this.centre();
    let fifths = notes.map((n) => this.choose(mod(n.key, 12), centre));
    // A group must stay compact: if it spans more than 11 fifths, respell it inside the
    // 12-note window around the centre.
    if (Math.max(...fifths) - Math.min(...fifths) > 11) fifths = notes.map((n) => nearestSpelling(mod(n.key, 12), centre).fifths);
    const result = notes.map((n, i) => onKey({ fifths: fifths[i]! }, n.key));
    notes.forEach((n, i) => {
      const f = fifths[i]!;
      this.lastSpelling.set(mod(n.key, 12), f);
      this.held.set(noteId(n), f);
      this.sum += f;
      this.weight += 1;
    });
    return result;
  }

  noteOff(note: NoteContext): void {
    this.held.delete(noteId(note));
  }

  currentWindow(): KeyboardWindow {
    return keyboardWindow(Math.round(this.centre() - 5.5));
  }
}

function noteId(n: NoteContext): number {
  return n.source * 2048 + n.channel * 128 + n.key;
}
