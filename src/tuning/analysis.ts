/** A pure (just) interval p/q of small whole numbers. */
export interface PureInterval {
  readonly p: number;
  readonly q: number;
  readonly name: string;
}

function pure(p: number, q: number, name: string): PureInterval {
  return { p, q, name };
}

/** The pure intervals sizes are compared with, within one octave, ascending. */
export const PURE_INTERVALS: readonly PureInterval[] = [
  pure(1, 1, 'unison'),
  pure(16, 15, 'diatonic semitone'),
  pure(9, 8, 'major tone'),
  pure(7, 6, 'septimal minor third'),
  pure(6, 5, 'minor third'),
  pure(5, 4, 'major third'),
  pure(4, 3, 'fourth'),
  pure(7, 5, 'septimal tritone'),
  pure(10, 7, 'septimal tritone'),
  pure(3, 2, 'fifth'),
  pure(8, 5, 'minor sixth'),
  pure(5, 3, 'major sixth'),
  pure(7, 4, 'harmonic seventh'),
  pure(9, 5, 'minor seventh'),
  pure(15, 8, 'major seventh'),
  pure(2, 1, 'octave'),
];

export const PURE_FIFTH_INTERVAL = pure(3, 2, 'fifth');
export const PURE_MAJOR_THIRD = pure(5, 4, 'major third');

export function pureCents(i: PureInterval): number {
  return 1200 * Math.log2(i.p / i.q);
}

/** A compound-aware pure interval: the octave-reduced one times 2^octaves. */
export interface PureTarget {
  readonly interval: PureInterval;
  readonly octaves: number;
}

/** The pure interval nearest a size in cents, octaves folded in (1902 cents → 3/2 plus an octave). */
export function nearestPure(sizeCents: number, candidates: readonly PureInterval[] = PURE_INTERVALS): PureTarget {
  const octaves = Math.floor(sizeCents / 1200);
  const within = sizeCents - 1200 * octaves;
  let best = candidates[0] ?? PURE_INTERVALS[0]!;
  for (const c of candidates) if (Math.abs(pureCents(c) - within) < Math.abs(pureCents(best) - within)) best = c;
  return { interval: best, octaves };
}

export interface IntervalAnalysis {
  readonly cents: number;
  readonly pure: PureTarget;
  /** Size minus the pure size, in cents (positive: wider than pure). */
  readonly deviation: number;
  /** Beats per second between the coinciding partials: |q·f₂ − p·f₁| with p/q in lowest terms. */
  readonly beats: number;
}

function gcd(a: number, b: number): number {
  return b === 0 ? a : gcd(b, a % b);
}

/**
 * Analyses the interval from `lowerHz` up to `upperHz` against `target`, or the nearest pure
 * interval when no target is given.
 */
export function analyseInterval(lowerHz: number, upperHz: number, target?: PureTarget): IntervalAnalysis {
  const size = 1200 * Math.log2(upperHz / lowerHz);
  const pureTarget = target ?? nearestPure(size);
  const up = pureTarget.interval.p * 2 ** Math.max(0, pureTarget.octaves);
  const down = pureTarget.interval.q * 2 ** Math.max(0, -pureTarget.octaves);
  const common = gcd(up, down);
  const p = up / common;
  const q = down / common;
  return {
    cents: size,
    pure: pureTarget,
    deviation: size - 1200 * Math.log2(p / q),
    beats: Math.abs(q * upperHz - p * lowerHz),
  };
}

/** How far from pure a fifth or a third may lie before it is called a wolf, in cents. */
export interface WolfLimits {
  readonly fifth: number;
  readonly third: number;
}

/**
 * Defaults: a fifth more than 10 cents from 3/2 (the mildest wolf in common use, 1/6-comma
 * meantone's, is about 16 cents wide), a third more than 25 cents from 5/4 (the Pythagorean
 * ditone, 21.5 cents wide, is harsh but not a wolf). Common practice, no source.
 */
export const DEFAULT_WOLF_LIMITS: WolfLimits = { fifth: 10, third: 25 };
