import { octavesFromC4, spelledPitch, type PitchClass, type SpelledPitch } from '../../pitch/index.js';
import { cents, divide } from '../ratio.js';
import type { Reference } from '../reference.js';
import { pitchSize, type Tuning } from '../tuning.js';
import { IntervalTable } from './intervals.js';
import { DEFAULT_ADAPTIVE, type AdaptiveSettings } from './settings.js';
import { solveSymmetric } from './solve.js';

/** Whatever names a note to its owner (the router's note id). */
export type AdaptiveNoteId = number | string;

/** A note placed by the tuner. Its pitch never changes while it sounds. */
export interface AdaptedNote {
  readonly id: AdaptiveNoteId;
  readonly pitch: SpelledPitch;
  /** Cents above the reference pitch (A4 = 440 Hz → 0 for A4 in the fixed table). */
  readonly cents: number;
  readonly hz: number;
  /** Cents from the same spelling in the fixed table of the current key. */
  readonly fromTable: number;
  /** True when one of its consonances with the notes sounding misses pure by more than the tolerance. */
  readonly compromise: boolean;
}

export interface AdaptiveCounts {
  readonly notes: number;
  /** Notes placed at a compromise pitch (see `AdaptiveSettings.compromiseCents`). */
  readonly compromises: number;
  /** Phrases begun from silence, where the level returned to the fixed table. */
  readonly phrases: number;
}

interface Released {
  readonly pitch: SpelledPitch;
  readonly cents: number;
  readonly off: number;
}

export interface AdaptiveTunerOptions {
  /** The fixed table (a 5-limit just table): the level's anchor, and what the tuner answers in silence. */
  readonly table: Tuning;
  readonly reference: Reference;
  readonly settings?: Partial<AdaptiveSettings>;
}

function add(array: Float64Array, index: number, amount: number): void {
  array[index] = array[index]! + amount;
}

/** A released note whose weight has fallen below this is forgotten. */
const FORGET_BELOW = 1 / 64;
/** Ties a chord's level to the table while its shape is solved, too weakly to bend the shape. */
const GAUGE = 1e-9;

/**
 * Adaptive just intonation: each new note (or chord) takes the pitch that makes its intervals to
 * the notes sounding, and with less weight to the notes just heard, as close to pure as the
 * spelling allows, while notes already sounding never move.
 *
 * Method after D. Stange, C. Wick and H. Hinrichsen, "Playing Music in Just Intonation: A
 * Dynamically Adaptive Tuning Scheme", Computer Music Journal 42(3), 2018: a weighted
 * least-squares fit of the sounding intervals to their pure sizes, with a memory of recent
 * pitches and a weak tie to a reference tuning. Here the spelling picks each interval's pure ratio
 * (`IntervalTable`), sounding notes are held fixed, and the fit runs in two steps:
 *
 * 1. *shape*: the new notes' pitches minimising Σ w·(xᵢ − xⱼ − tᵢⱼ)² over pairs among them and with
 *    the sounding notes (a small symmetric system, solved by Cholesky);
 * 2. *level*: one common shift s of each connected group of new notes, minimising
 *    W·s² + anchor·n·(s − s_table)² + Σ recent·w·2^(−age/half-life)·(s − s_recent)², where W is the
 *    weight of the group's intervals to sounding notes. Moving only the level keeps a new chord
 *    pure among itself whatever the memory and anchor terms ask.
 *
 * Pure, synchronous and clock-free: time is each call's timestamp in milliseconds.
 */
export class AdaptiveTuner {
  readonly settings: AdaptiveSettings;
  private readonly intervals: IntervalTable;
  private readonly table: Tuning;
  private readonly reference: Reference;
  private tonicTable: Tuning;
  private readonly tableCache = new Map<number, Map<number, number>>();
  private readonly sounding = new Map<AdaptiveNoteId, AdaptedNote>();
  private recent: Released[] = [];
  private silentSince = -Infinity;
  private counts = { notes: 0, compromises: 0, phrases: 0 };

  constructor(options: AdaptiveTunerOptions) {
    this.settings = { ...DEFAULT_ADAPTIVE, ...options.settings };
    this.intervals = new IntervalTable(this.settings);
    this.table = options.table;
    this.tonicTable = options.table;
    this.reference = options.reference;
  }

  /** The key whose fixed table anchors the level (a speller's tonic); undefined: the table's own. */
  setTonic(tonic: PitchClass | undefined): void {
    this.tonicTable = tonic === undefined ? this.table : this.table.withTonic(tonic);
  }

  /** A note begins: its pitch, which stays until `noteOff`. */
  noteOn(time: number, id: AdaptiveNoteId, pitch: SpelledPitch): AdaptedNote {
    return this.chordOn(time, [{ id, pitch }])[0]!;
  }

  /** Notes that begin together, tuned jointly: pure among themselves and fitted to what sounds. */
  chordOn(time: number, notes: ReadonlyArray<{ readonly id: AdaptiveNoteId; readonly pitch: SpelledPitch }>): AdaptedNote[] {
    for (const n of notes) if (this.sounding.has(n.id)) this.noteOff(time, n.id);
    if (notes.length === 0) return [];
    this.forget(time);
    const held = [...this.sounding.values()];
    const present = new Set<number>([...held.map((h) => h.pitch.fifths), ...notes.map((n) => n.pitch.fifths)]);
    const n = notes.length;
    const tableCents = notes.map((note) => this.tableCents(note.pitch));

    // 1. shape
    const a = new Float64Array(n * n);
    const b = new Float64Array(n);
    const heldWeight = new Float64Array(n);
    const group = notes.map((_, i) => i); // union-find over new notes joined by weighted intervals
    const root = (i: number): number => {
      while (group[i] !== i) i = group[i] = group[group[i]!]!;
      return i;
    };
    for (let i = 0; i < n; i++) {
      const p = notes[i]!.pitch;
      a[i * n + i] = GAUGE;
      b[i] = GAUGE * tableCents[i]!;
      for (const h of held) {
        const t = this.intervals.target(h.pitch, p, present);
        if (t.weight === 0) continue;
        add(a, i * n + i, t.weight);
        add(b, i, t.weight * (h.cents + t.cents));
        add(heldWeight, i, t.weight);
      }
      for (let k = 0; k < i; k++) {
        const t = this.intervals.target(notes[k]!.pitch, p, present); // x_i − x_k ≈ t
        if (t.weight === 0) continue;
        add(a, i * n + i, t.weight);
        add(a, k * n + k, t.weight);
        add(a, i * n + k, -t.weight);
        add(a, k * n + i, -t.weight);
        add(b, i, t.weight * t.cents);
        add(b, k, -(t.weight * t.cents));
        group[root(i)] = root(k);
      }
    }
    const x = solveSymmetric(a, b, n);

    // 2. level, per group of new notes joined by intervals
    const { anchor, recentWeight, recentHalfLifeMs } = this.settings;
    const sums = new Map<number, { weight: number; pull: number }>();
    for (let i = 0; i < n; i++) {
      const g = root(i);
      const sum = sums.get(g) ?? { weight: 0, pull: 0 };
      sums.set(g, sum);
      sum.weight += heldWeight[i]! + anchor;
      sum.pull += anchor * (tableCents[i]! - x[i]!);
      for (const r of this.recent) {
        const t = this.intervals.target(r.pitch, notes[i]!.pitch, present);
        if (t.weight === 0) continue;
        const w = recentWeight * t.weight * 2 ** ((r.off - time) / recentHalfLifeMs);
        sum.weight += w;
        sum.pull += w * (r.cents + t.cents - x[i]!);
      }
    }
    const placed: AdaptedNote[] = [];
    for (let i = 0; i < n; i++) {
      const sum = sums.get(root(i))!;
      const shift = sum.weight > 0 ? sum.pull / sum.weight : tableCents[i]! - x[i]!;
      x[i] = x[i]! + shift;
    }
    for (let i = 0; i < n; i++) {
      const { id, pitch } = notes[i]!;
      const c = x[i]!;
      let compromise = false;
      const check = (other: SpelledPitch, otherCents: number): void => {
        if (compromise || !this.intervals.isConsonant(other, pitch)) return;
        const t = this.intervals.target(other, pitch, present);
        if (Math.abs(c - otherCents - t.cents) > this.settings.compromiseCents) compromise = true;
      };
      for (const h of held) check(h.pitch, h.cents);
      for (let k = 0; k < n; k++) if (k !== i) check(notes[k]!.pitch, x[k]!);
      const note: AdaptedNote = { id, pitch, cents: c, hz: this.reference.hz.valueOf() * 2 ** (c / 1200), fromTable: c - tableCents[i]!, compromise };
      this.sounding.set(id, note);
      placed.push(note);
      this.counts.notes++;
      if (compromise) this.counts.compromises++;
    }
    return placed;
  }

  /** A note ends; it is remembered, with a fading weight, as a note just heard. */
  noteOff(time: number, id: AdaptiveNoteId): void {
    const note = this.sounding.get(id);
    if (!note) return;
    this.sounding.delete(id);
    this.recent.push({ pitch: note.pitch, cents: note.cents, off: time });
    if (this.sounding.size === 0) this.silentSince = time;
  }

  /** Everything ends and is forgotten (panic, a new piece): the next note starts a phrase. */
  reset(): void {
    this.sounding.clear();
    this.recent = [];
    this.silentSince = -Infinity;
  }

  /** The notes sounding, with the pitches they were given. */
  soundingNotes(): AdaptedNote[] {
    return [...this.sounding.values()];
  }

  /** Where a spelling would sound in silence: the fixed table of the current key (charts, previews). */
  tableCents(pitch: SpelledPitch): number {
    const key = this.tonicTable.origin.fifths;
    let byClass = this.tableCache.get(key);
    if (!byClass) {
      byClass = new Map();
      this.tableCache.set(key, byClass);
    }
    let classCents = byClass.get(pitch.fifths);
    if (classCents === undefined) {
      // the class's cents above the reference pitch, less its octaves (size = class size · 2^octavesFromC4)
      const probe = spelledPitch(pitch, 4);
      classCents = cents(divide(pitchSize(this.tonicTable, probe), pitchSize(this.tonicTable, this.reference.pitch))) - 1200 * octavesFromC4(probe);
      byClass.set(pitch.fifths, classCents);
    }
    return classCents + 1200 * octavesFromC4(pitch);
  }

  counters(): AdaptiveCounts {
    return { ...this.counts };
  }

  private forget(time: number): void {
    if (this.sounding.size === 0 && this.recent.length > 0 && time - this.silentSince >= this.settings.phraseGapMs) {
      this.recent = [];
    }
    if (this.sounding.size === 0 && this.recent.length === 0) this.counts.phrases++;
    const limit = this.settings.recentHalfLifeMs * Math.log2(1 / FORGET_BELOW);
    if (this.recent.length > 0 && time - (this.recent[0]?.off ?? time) > limit) this.recent = this.recent.filter((r) => time - r.off <= limit);
  }
}
