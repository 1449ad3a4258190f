/** Which primes the pure intervals may use. */
export type Limit = 5 | 7;
/** The 5-limit minor seventh. */
export type MinorSeventh = '16/9' | '9/5';

/**
 * The player's settings of adaptive just intonation. Weights are relative to a consonance (a
 * fifth, third or sixth) between a new note and a note still sounding, which counts 1.
 */
export interface AdaptiveSettings {
  /** 5: fifths and thirds; 7: also 7/4 minor sevenths (and 7/5, 7/6 in seventh chords). */
  readonly limit: Limit;
  /** The 5-limit minor seventh: 16/9 (two fourths) or 9/5 (a fifth and a minor third). */
  readonly minorSeventh: MinorSeventh;
  /**
   * Drift control, "pure now" (0) against "no drift" (large): how strongly the pitch level of each
   * new note or chord is tied to the fixed table of the current key, per new note. With notes
   * sounding it pulls new notes off their pure intervals to those notes; with nothing sounding
   * the level follows the table and the notes just heard.
   */
  readonly anchor: number;
  /**
   * How strongly the level is pulled to a whole number of syntonic commas from the table (0: not
   * at all): heals the fractions of a comma that compromises leave, without undoing a whole
   * comma's move that pure intervals ask for.
   */
  readonly snap: number;
  /** How strongly the intervals to notes just released (melodic intervals, repeated notes) count. */
  readonly recentWeight: number;
  /** Whether the notes just heard also pull new notes that sound against held ones (off: held notes alone decide). */
  readonly recentWhileHeld: boolean;
  /** Half-life of a released note's influence, in milliseconds. */
  readonly recentHalfLifeMs: number;
  /**
   * After this long with nothing sounding a new phrase starts: the notes heard before are forgotten
   * and the level returns to the fixed table of the key.
   */
  readonly phraseGapMs: number;
  /**
   * Glide, for organ-like sustained chords: held notes move together toward the table's level by
   * at most this many cents a second (0: off, the default; held notes never move).
   */
  readonly glideCentsPerSecond: number;
  /** How far the glide may take a note from the pitch it began at. */
  readonly glideMaxCents: number;
  /** A note whose octaves, fifths, fourths, thirds or sixths with the notes sounding miss pure by more than this many cents is counted as a compromise. */
  readonly compromiseCents: number;
}

/** Chosen on the bench (bench/adaptive.ts): drift within 3 cents with the corpora nearly pure. */
export const DEFAULT_ADAPTIVE: AdaptiveSettings = {
  limit: 5,
  minorSeventh: '9/5',
  anchor: 0.8,
  snap: 3,
  recentWeight: 0.05,
  recentWhileHeld: false,
  recentHalfLifeMs: 500,
  phraseGapMs: 300,
  compromiseCents: 0.5,
  glideCentsPerSecond: 0,
  glideMaxCents: 10,
};
