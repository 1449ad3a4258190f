import type { SpelledPitch } from '../pitch/index.js';

/** One written note that begins a sound (a tied continuation is not one). */
export interface ScoreNote {
  /** The MIDI key that sounds it (C4 = 60). */
  readonly key: number;
  /** The written spelling, from `<pitch>` step/alter/octave (sounding, if the part transposes). */
  readonly pitch: SpelledPitch;
  /** Part index (0-based, in the order of the file) and staff within it (1-based). */
  readonly part: number;
  readonly staff: number;
  readonly voice: string;
  /** A grace note (`<grace/>`): written small, takes no time of its own. */
  readonly grace: boolean;
  /** Marked `print-object="no"`: an ornament's realisation the notation program wrote out. */
  readonly hidden: boolean;
  /** The upper or lower note of a written trill, mordent or turn whose accidental the score marks. */
  readonly auxiliaries: readonly SpelledPitch[];
}

/**
 * The notes that begin together: a chord across every part, staff and voice. Grace notes before a
 * main note form groups of their own, just before it.
 */
export interface OnsetGroup {
  readonly index: number;
  /** Index into `Score.measures`. */
  readonly measure: number;
  /** Quarter notes from the start of the score, in written order (repeats not unfolded). */
  readonly time: number;
  readonly notes: readonly ScoreNote[];
  /** The distinct keys of `notes`, ascending. */
  readonly keys: readonly number[];
  /** Every note is a grace note or hidden: a player may leave the group out or play it otherwise. */
  readonly optional: boolean;
  /** The key signature in force (fifths: 1 = one sharp, −2 = two flats). */
  readonly keyFifths: number;
}

/** How a measure takes part in the score's repeat structure. */
export interface MeasureMarks {
  /** A forward repeat barline at its start. */
  readonly repeatStart: boolean;
  /** A backward repeat at its end: how many times the section is played in all (0: none). */
  readonly repeatEnd: number;
  /** The ending numbers this measure belongs to (`[1]` for a first-time bar), empty when none. */
  readonly endings: readonly number[];
  /** The segno's label if a segno stands here; the coda's label if a coda begins here. */
  readonly segno: string | undefined;
  readonly coda: string | undefined;
  /** At its end: da capo, dal segno (to the label), to coda (to the label), fine. */
  readonly daCapo: boolean;
  readonly dalSegno: string | undefined;
  readonly toCoda: string | undefined;
  readonly fine: boolean;
}

export interface ScoreMeasure extends MeasureMarks {
  readonly index: number;
  /** The measure's `number` attribute as written ("12", "12a", "0" for a pick-up). */
  readonly number: string;
  /** Quarter notes from the start of the score. */
  readonly start: number;
  readonly length: number;
  /** Its groups are `firstGroup` … `endGroup − 1` (equal when the measure has no onsets). */
  readonly firstGroup: number;
  readonly endGroup: number;
  readonly keyFifths: number;
}

/** A way the performance may leave the written order: after group `from`, on at group `to`. */
export interface Jump {
  readonly from: number;
  readonly to: number;
  readonly kind: 'repeat' | 'ending' | 'da-capo' | 'dal-segno' | 'to-coda';
}

/** A score as the follower sees it: onset groups in written order, measures, and the possible jumps. */
export interface Score {
  readonly title: string;
  readonly measures: readonly ScoreMeasure[];
  readonly groups: readonly OnsetGroup[];
  readonly jumps: readonly Jump[];
}

/** Every written onset, in order (for tests and reports). */
export function scoreNotes(score: Score): Array<{ group: OnsetGroup; note: ScoreNote }> {
  return score.groups.flatMap((group) => group.notes.map((note) => ({ group, note })));
}
