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

/** What decides the common shift of a group of new notes (see `levelShift`). */
interface Level {
  /** Weight of the group's intervals to held notes: how much a shift would cost in purity. */
  held: number;
  count: number;
  /** (table − pitch) of each spelled pitch class sounding: the held notes' and the group's as shaped. */
  readonly offsets: number[];
  /** The same of the group's new notes alone. */
  readonly fresh: number[];
  recentWeight: number;
  recentPull: number;
}

/** The syntonic comma, 81/80, in cents: two 5-limit pitches of one spelling differ by a whole number of them. */
export const SYNTONIC_COMMA_CENTS = 1200 * Math.log2(81 / 80);

/**
 * The common shift of a group of new notes. Held notes resist it (weight `held`, target 0);
 * `anchor` pulls toward the fixed table — the median offset of what sounds, so a chord whose
 * notes mostly sit on the table is not pulled for the one note a comma away (the D of D–F–A in
 * C major) while a texture a comma off is, but never past the table; the notes just heard pull
 * toward their intervals. `snap` then pulls the result to the nearest level that puts the new
 * notes' median a whole number of commas from the table, which heals the fractions of a comma
 * that compromises leave, at little cost in purity.
 */
function levelShift(level: Level, anchor: number, snap: number): number {
  // The new notes' own median offset. Held notes only temper the pull toward the table: the
  // target lies between 0 and `own`, so the anchor never pushes new notes past the table (toward
  // where held notes stray) when they are tied to those notes by dissonances alone.
  const own = median([...level.fresh]);
  const table = Math.min(Math.max(median([...level.offsets]), Math.min(0, own)), Math.max(0, own));
  const a = anchor * level.count;
  const free = level.held + a + level.recentWeight;
  const shift = free > 0 ? (a * table + level.recentPull) / free : table;
  const s = snap * (level.held + level.count);
  if (s === 0) return shift;
  // The lattice of the new notes' median: a shift of `own` puts that note on the table, and
  // whole commas from it keep it a whole comma off. A median, not a mean: one note the shape
  // had to compromise (a fifth given up for a second) does not move the lattice.
  const lattice = own + SYNTONIC_COMMA_CENTS * Math.round((shift - own) / SYNTONIC_COMMA_CENTS);
  const w = free > 0 ? free : 1;
  return (w * shift + s * lattice) / (w + s);
}

/** A number naming a spelled pitch (its line-of-fifths position and octave), for maps on the note path. */
function pitchKey(pitch: SpelledPitch): number {
  return (pitch.fifths + 512) * 1024 + (pitch.octave + 512);
}

/** One note of each pitch sounding (spelling, octave and cents alike): a unison doubling counts once. */
function distinctPitches(notes: readonly AdaptedNote[]): AdaptedNote[] {
  const kept: AdaptedNote[] = [];
  for (const h of notes) {
    if (!kept.some((k) => k.pitch.fifths === h.pitch.fifths && k.pitch.octave === h.pitch.octave && Math.abs(k.cents - h.cents) < 1e-6)) kept.push(h);
  }
  return kept;
}

/** The median; of an even count, whichever middle value asks for the smaller shift (the lower on a tie). */
function median(values: number[]): number {
  values.sort((p, q) => p - q);
  const mid = values.length >> 1;
  if (values.length % 2 === 1) return values[mid]!;
  const low = values[mid - 1]!;
  const high = values[mid]!;
  return Math.abs(high) < Math.abs(low) ? high : low;
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
 *    W·s² + anchor·n·(s − s_table)² + recent·(s − s_recent)², then drawn toward the nearest whole
 *    number of syntonic commas from the table (`snap`; see `levelShift`). W is the weight of the
 *    group's intervals to sounding notes (a shift costs that much purity), s_table the median
 *    offset of what sounds from the fixed table (kept between 0 and the new notes' own median),
 *    s_recent what the notes just heard ask for (fading with a half-life). Moving only the level
 *    keeps a new chord pure among itself whatever the memory and anchor terms ask; with nothing
 *    sounding it lands on the table.
 *
 * Parts in unison are one pitch: a spelled pitch sounding or struck twice is tuned and weighed
 * once, and a new note in unison with a held one takes the held note's pitch.
 *
 * Drift: after `phraseGapMs` of silence the notes heard before are forgotten and the next chord
 * starts on the table (the tonic where the table has it); while notes sound, `anchor` trades
 * purity against the held notes for a level that stays near the table.
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
  /** Glide (off by default): a common offset every sounding note follows from its onset on. */
  private glide = 0;
  private glideTarget = 0;
  private glideClock = -Infinity;
  private readonly glideAt = new Map<AdaptiveNoteId, number>();
  private recent: Released[] = [];
  private silentSince = -Infinity;
  private counts = { notes: 0, compromises: 0, phrases: 0 };

  constructor(options: AdaptiveTunerOptions) {
    this.settings = { ...DEFAULT_ADAPTIVE, ...options.settings };
    this.intervals = new IntervalTable(this.settings);
    this.table = options.table;
    this.tonicTable = options.table;
    this.reference = options.reference;
    this.warm();
  }

  /**
   * The key whose fixed table anchors the level: the piece's key as declared (`--key`, a
   * set-key control); undefined: the table's own tonic. A key estimate that follows every
   * modulation moves the anchor by a comma at some key changes (the bench measures it).
   */
  setTonic(tonic: PitchClass | undefined): void {
    this.tonicTable = tonic === undefined ? this.table : this.table.withTonic(tonic);
    this.warm();
  }

  /** Computes the table's common spellings (exact arithmetic) now, off the note path. */
  private warm(): void {
    for (let fifths = -15; fifths <= 15; fifths++) this.tableCents({ fifths, octave: 4 });
  }

  /** A note begins: its pitch, which stays until `noteOff`. */
  noteOn(time: number, id: AdaptiveNoteId, pitch: SpelledPitch): AdaptedNote {
    return this.chordOn(time, [{ id, pitch }])[0]!;
  }

  /** Notes that begin together, tuned jointly: pure among themselves and fitted to what sounds. */
  chordOn(time: number, given: ReadonlyArray<{ readonly id: AdaptiveNoteId; readonly pitch: SpelledPitch }>): AdaptedNote[] {
    for (const n of given) if (this.sounding.has(n.id)) this.noteOff(time, n.id);
    if (given.length === 0) return [];
    this.forget(time);
    // Parts in unison sound one pitch: each distinct spelled pitch is tuned once and weighs once,
    // so a doubled note neither outvotes the others nor holds the level harder than a single one
    // (and the engine, which sounds a unison on one synth key, hears the same chord as the score).
    // A new note in unison with a held one takes the held note's pitch: two parts a few cents
    // apart on one note beat, and a synth sounding them on one key cannot tell them apart.
    const held = distinctPitches(this.soundingNotes());
    const heldPitch = new Map(held.map((h) => [pitchKey(h.pitch), h]));
    const notes: Array<{ readonly pitch: SpelledPitch }> = [];
    const slotOf = new Map<number, number>();
    const slots = given.map((g) => {
      const key = pitchKey(g.pitch);
      if (heldPitch.has(key)) return -1;
      let slot = slotOf.get(key);
      if (slot === undefined) slotOf.set(key, (slot = notes.push({ pitch: g.pitch }) - 1));
      return slot;
    });
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
    const { anchor, snap, recentWeight, recentHalfLifeMs } = this.settings;
    // Offsets (table − pitch) of what sounds: the held notes and each group's new notes.
    // One offset per spelled pitch class: a doubled note does not outvote the others.
    const heldOff = new Map<number, number>();
    for (const h of held) if (!heldOff.has(h.pitch.fifths)) heldOff.set(h.pitch.fifths, this.tableCents(h.pitch) - h.cents);
    const groups = new Map<number, Level & { classes: Map<number, number>; freshClasses: Set<number> }>();
    for (let i = 0; i < n; i++) {
      const g = root(i);
      let level = groups.get(g);
      if (!level) groups.set(g, (level = { held: 0, count: 0, offsets: [], fresh: [], freshClasses: new Set(), classes: new Map(heldOff), recentWeight: 0, recentPull: 0 }));
      level.held += heldWeight[i]!;
      const fifths = notes[i]!.pitch.fifths;
      if (!level.classes.has(fifths)) level.classes.set(fifths, tableCents[i]! - x[i]!);
      if (!level.freshClasses.has(fifths)) {
        level.freshClasses.add(fifths);
        level.fresh.push(tableCents[i]! - x[i]!);
      }
      level.count++;
    }
    for (const level of groups.values()) level.offsets.push(...level.classes.values());
    for (let i = 0; i < n; i++) {
      const level = groups.get(root(i))!;
      if (level.held > 0 && !this.settings.recentWhileHeld) continue;
      // The notes just heard ask for one shift of this note: their weighted mean, weighing as
      // much as the freshest of them (so `recentWeight` compares directly with `anchor`).
      let weights = 0;
      let desired = 0;
      let freshest = 0;
      for (const r of this.recent) {
        const t = this.intervals.target(r.pitch, notes[i]!.pitch, present);
        if (t.weight === 0) continue;
        const fading = 2 ** ((r.off - time) / recentHalfLifeMs);
        weights += t.weight * fading;
        desired += t.weight * fading * (r.cents + t.cents - x[i]!);
        freshest = Math.max(freshest, fading);
      }
      if (weights === 0) continue;
      level.recentWeight += recentWeight * freshest;
      level.recentPull += recentWeight * freshest * (desired / weights);
    }
    const shifts = new Map<number, number>();
    for (const [g, level] of groups) shifts.set(g, levelShift(level, anchor, snap));
    for (let i = 0; i < n; i++) x[i] = x[i]! + shifts.get(root(i))!;
    const compromised = notes.map(({ pitch }, i) => {
      const c = x[i]!;
      const off = (other: SpelledPitch, otherCents: number): boolean =>
        this.intervals.isConsonant(other, pitch) && Math.abs(c - otherCents - this.intervals.target(other, pitch, present).cents) > this.settings.compromiseCents;
      return held.some((h) => off(h.pitch, h.cents)) || notes.some((k, j) => j !== i && off(k.pitch, x[j]!));
    });
    const placed: AdaptedNote[] = [];
    for (let g = 0; g < given.length; g++) {
      const { id, pitch } = given[g]!;
      const i = slots[g]!;
      const unison = i < 0 ? heldPitch.get(pitchKey(pitch))! : undefined;
      const c = unison ? unison.cents : x[i]!;
      const compromise = unison ? unison.compromise : compromised[i]!;
      const note: AdaptedNote = { id, pitch, cents: c, hz: this.reference.hz.valueOf() * 2 ** (c / 1200), fromTable: unison ? unison.fromTable : c - tableCents[i]!, compromise };
      this.sounding.set(id, note);
      this.glideAt.set(id, this.glide);
      placed.push(note);
      this.counts.notes++;
      if (compromise) this.counts.compromises++;
    }
    this.aimGlide();
    return placed;
  }

  /** A note ends; it is remembered, with a fading weight, as a note just heard. */
  noteOff(time: number, id: AdaptiveNoteId): void {
    const note = this.current(id);
    if (!note) return;
    this.sounding.delete(id);
    this.glideAt.delete(id);
    this.recent.push({ pitch: note.pitch, cents: note.cents, off: time });
    if (this.sounding.size === 0) this.silentSince = time;
    this.aimGlide();
  }

  /**
   * Lets time pass for the glide (`glideCentsPerSecond` > 0): every sounding note moves by the
   * same amount toward the level of the fixed table, at most `glideMaxCents` from where it began,
   * so the sounding intervals stay as they are. Returns the notes whose pitch changed (none with
   * the glide off). Call it before `chordOn` and `noteOff` at the same time.
   */
  tick(time: number): AdaptedNote[] {
    const { glideCentsPerSecond: rate, glideMaxCents: max } = this.settings;
    const elapsed = time - this.glideClock;
    this.glideClock = time;
    if (rate <= 0 || this.sounding.size === 0 || !(elapsed > 0)) return [];
    let low = -Infinity;
    let high = Infinity;
    for (const at of this.glideAt.values()) {
      low = Math.max(low, at - max);
      high = Math.min(high, at + max);
    }
    const want = Math.min(high, Math.max(low, this.glideTarget));
    const step = (rate * elapsed) / 1000;
    const next = want > this.glide ? Math.min(want, this.glide + step) : Math.max(want, this.glide - step);
    if (next === this.glide) return [];
    this.glide = next;
    return this.soundingNotes();
  }

  /** Where the glide heads: the common offset that puts what sounds on the table (its median, per pitch class). */
  private aimGlide(): void {
    if (this.settings.glideCentsPerSecond <= 0) return;
    const offsets = new Map<number, number>();
    for (const n of this.soundingNotes()) if (!offsets.has(n.pitch.fifths)) offsets.set(n.pitch.fifths, this.tableCents(n.pitch) - n.cents);
    this.glideTarget = offsets.size === 0 ? this.glide : this.glide + median([...offsets.values()]);
  }

  /** A sounding note as it sounds now (moved by the glide since its onset). */
  private current(id: AdaptiveNoteId): AdaptedNote | undefined {
    const note = this.sounding.get(id);
    const moved = note && this.glide - (this.glideAt.get(id) ?? this.glide);
    if (!note || !moved) return note;
    const cents = note.cents + moved;
    return { ...note, cents, hz: this.reference.hz.valueOf() * 2 ** (cents / 1200), fromTable: note.fromTable + moved };
  }

  /** Everything ends and is forgotten (panic, a new piece): the next note starts a phrase. */
  reset(): void {
    this.sounding.clear();
    this.glideAt.clear();
    this.glide = 0;
    this.glideTarget = 0;
    this.recent = [];
    this.silentSince = -Infinity;
  }

  /** The notes sounding, with the pitches they were given (and, with the glide on, have glided to). */
  soundingNotes(): AdaptedNote[] {
    return [...this.sounding.keys()].map((id) => this.current(id)!);
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
