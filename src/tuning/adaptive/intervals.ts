import { octavesFromC4, type SpelledPitch } from '../../pitch/index.js';
import { cents, ratio, type PitchRatio } from '../ratio.js';
import { nearCents } from '../tuning.js';
import type { Limit, MinorSeventh } from './settings.js';

export type { Limit, MinorSeventh } from './settings.js';

/**
 * What the spelling of an interval asks for: its pure ratio and how much its purity matters.
 *
 * An interval between two spelled pitches is a distance on the line of fifths (`fifths`: +4 a
 * major third, −3 a minor third, −8 a diminished fourth) plus whole octaves. The distance decides
 * the ratio, so G♯–C (a diminished fourth, 32/25) is never tuned as A♭–C (a major third, 5/4).
 *
 * The 5-limit table (the usual just ratios of each interval class; common practice, no source —
 * the same ratios as the `just-major` preset's table, after Zarlino and Barbour):
 *
 * | fifths | interval (inversion)                     | ratio (inversion) | weight |
 * | -----: | ---------------------------------------- | ----------------- | -----: |
 * |      0 | unison, octave                           | 1/1               |      2 |
 * |     ±1 | perfect fifth (fourth)                   | 3/2 (4/3)         |      1 |
 * |     ±4 | major third (minor sixth)                | 5/4 (8/5)         |      1 |
 * |     ∓3 | minor third (major sixth)                | 6/5 (5/3)         |      1 |
 * |     ±2 | major second (minor seventh)             | 9/8 (16/9)        |   0.03 |
 * |     ±5 | major seventh (minor second)             | 15/8 (16/15)      |   0.05 |
 * |     ±6 | augmented fourth (diminished fifth)      | 45/32 (64/45)     |   0.05 |
 * |     ±7 | augmented unison (diminished octave)     | 25/24 (48/25)     |   0.02 |
 * |     ±8 | augmented fifth (diminished fourth)      | 25/16 (32/25)     |   0.02 |
 * |     ±9 | augmented second (diminished seventh)    | 75/64 (128/75)    |   0.02 |
 * |  ≥ ±10 | anything further                         | (not tuned)       |      0 |
 *
 * Options: the minor seventh may be 9/5 (the minor third above a fifth; the default) instead of
 * 16/9 (two fourths), and then the diminished fifth is 36/25 (two minor thirds, 25/18 inverted)
 * instead of 64/45, so that dominant and half-diminished seventh chords and diminished triads can
 * sound with every interval at its target; the 7-limit table tunes the minor seventh 7/4 (major second 8/7), the diminished fifth
 * 7/5 (augmented fourth 10/7), with the seventh's weight raised to 0.5, and the minor third
 * from the fifth to the seventh of a chord that holds the root 7/6 (its inversion 12/7), so a
 * dominant seventh chord sounds as 4:5:6:7; a minor third without that root stays 6/5.
 */
export interface IntervalTarget {
  /** Pure size in cents, octave included (a major tenth: 1586.3). */
  readonly cents: number;
  /** How much the interval's purity counts in the least-squares fit (0: not at all). */
  readonly weight: number;
}


export interface IntervalTableOptions {
  readonly limit: Limit;
  /** The 5-limit minor seventh; the 7-limit table always uses 7/4. */
  readonly minorSeventh: MinorSeventh;
}

/** Weights of the consonances; the weakest of them (an octave, fifth, third or sixth) counts as consonant. */
export const CONSONANT_WEIGHT = 1;

/**
 * The weight of a 5-limit major second or minor seventh. Each has two just sizes a comma apart
 * (9/8 and 10/9; 16/9 and 9/5) that the spelling alone does not choose between, so it pulls only
 * weakly: at 0.1 the G–A of a G–D–A sonority dragged the pure fifth D–A by 5 cents toward a 10/9
 * second; at 0.03 the corpora sound their fifths, thirds and sixths 0.07 cent purer on average
 * (bench/adaptive.ts, measured while choosing it).
 */
const SECOND_WEIGHT = 0.03;

interface ClassEntry {
  readonly ratio: string;
  readonly weight: number;
}

const FIVE_LIMIT: ReadonlyMap<number, ClassEntry> = new Map([
  [0, { ratio: '1/1', weight: 2 }],
  [1, { ratio: '3/2', weight: 1 }],
  [-1, { ratio: '4/3', weight: 1 }],
  [4, { ratio: '5/4', weight: 1 }],
  [-4, { ratio: '8/5', weight: 1 }],
  [-3, { ratio: '6/5', weight: 1 }],
  [3, { ratio: '5/3', weight: 1 }],
  [2, { ratio: '9/8', weight: SECOND_WEIGHT }],
  [-2, { ratio: '16/9', weight: SECOND_WEIGHT }],
  [5, { ratio: '15/8', weight: 0.05 }],
  [-5, { ratio: '16/15', weight: 0.05 }],
  [6, { ratio: '45/32', weight: 0.05 }],
  [-6, { ratio: '64/45', weight: 0.05 }],
  [7, { ratio: '25/24', weight: 0.02 }],
  [-7, { ratio: '48/25', weight: 0.02 }],
  [8, { ratio: '25/16', weight: 0.02 }],
  [-8, { ratio: '32/25', weight: 0.02 }],
  [9, { ratio: '75/64', weight: 0.02 }],
  [-9, { ratio: '128/75', weight: 0.02 }],
]);

function tableOf(options: IntervalTableOptions): ReadonlyMap<number, ClassEntry> {
  const table = new Map(FIVE_LIMIT);
  if (options.limit === 7) {
    table.set(-2, { ratio: '7/4', weight: 0.5 });
    table.set(2, { ratio: '8/7', weight: 0.5 });
    table.set(-6, { ratio: '7/5', weight: 0.2 });
    table.set(6, { ratio: '10/7', weight: 0.2 });
  } else if (options.minorSeventh === '9/5') {
    table.set(-2, { ratio: '9/5', weight: SECOND_WEIGHT });
    table.set(2, { ratio: '10/9', weight: SECOND_WEIGHT });
    table.set(-6, { ratio: '36/25', weight: 0.05 });
    table.set(6, { ratio: '25/18', weight: 0.05 });
  }
  return table;
}

/**
 * The pure ratio the table gives a line-of-fifths distance, in the octave nearest its
 * stacked-fifths position (a major third, 4 fifths, near 2800 cents: 5/4 · 4 = 2786.3 cents), so
 * that `target(b) − target(a)` follows the same decomposition as `Tuning.classSize`.
 * Undefined beyond the table.
 */
export function classRatio(fifths: number, options: IntervalTableOptions): PitchRatio | undefined {
  const entry = tableOf(options).get(fifths);
  return entry && nearCents(ratio(entry.ratio), 700 * fifths);
}

/** 7/6 in the octave nearest three fifths down (−2100 cents): 266.87 − 2400. */
const SEPTIMAL_MINOR_THIRD = cents(nearCents(ratio('7/6'), -2100));

/** Interval targets for one table, cached by line-of-fifths distance. */
export class IntervalTable {
  private readonly classCents = new Map<number, number>();
  private readonly classWeight = new Map<number, number>();

  constructor(readonly options: IntervalTableOptions) {
    for (const [fifths, entry] of tableOf(options)) {
      this.classCents.set(fifths, cents(nearCents(ratio(entry.ratio), 700 * fifths)));
      this.classWeight.set(fifths, entry.weight);
    }
  }

  /**
   * The pure size of the interval from `from` to `to` (either may be the higher note). `present`
   * (line-of-fifths positions sounding with them) lets the 7-limit table find a seventh chord's
   * root for its 7/6 third.
   */
  target(from: SpelledPitch, to: SpelledPitch, present?: ReadonlySet<number>): IntervalTarget {
    const fifths = to.fifths - from.fifths;
    const octaves = 1200 * (octavesFromC4(to) - octavesFromC4(from));
    if (this.options.limit === 7 && present !== undefined && (fifths === -3 || fifths === 3)) {
      // fifth → seventh (−3) or seventh → fifth (+3): the root lies a fifth below the fifth.
      const fifthOfChord = fifths === -3 ? from.fifths : to.fifths;
      if (present.has(fifthOfChord - 1)) return { cents: (fifths === -3 ? SEPTIMAL_MINOR_THIRD : -SEPTIMAL_MINOR_THIRD) + octaves, weight: CONSONANT_WEIGHT };
    }
    const size = this.classCents.get(fifths);
    if (size === undefined) return { cents: 0, weight: 0 };
    return { cents: size + octaves, weight: this.classWeight.get(fifths) ?? 0 };
  }

  /** True for octaves, fifths, fourths, thirds and sixths: the intervals a chord wants pure. */
  isConsonant(from: SpelledPitch, to: SpelledPitch): boolean {
    return (this.classWeight.get(to.fifths - from.fifths) ?? 0) >= CONSONANT_WEIGHT;
  }
}
