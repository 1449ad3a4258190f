import { chromaOf, octavesFromC4, pitchClass, type PitchClass, type SpelledPitch } from '../pitch/index.js';
import { cents, multiply, power, ratio, UNISON, type PitchRatio } from './ratio.js';
import { PURE_FIFTH } from './interval-spec.js';
import type { AdaptiveSettings } from './adaptive/settings.js';

export type TuningKind = 'regular' | 'just' | 'circulating' | 'just-adaptive';

/**
 * A tuning gives every spelled pitch an exact size. Sizes are measured from C4 and split as
 * `size(p) = classSize(p) · 2^octavesFromC4(p)`, where `classSize` is the size of the pitch class
 * reached by its line-of-fifths position, in the octave nearest its 12-ET position (G♯ near 8 × 700 cents).
 */
export interface Tuning {
  readonly kind: TuningKind;
  /** The note the tuning is built from (the tonic of a just table, the start of a circulating table). */
  readonly origin: PitchClass;
  classSize(pc: PitchClass): PitchRatio;
  /** For a just table, the same table built on another tonic; every other kind returns itself. */
  withTonic(tonic: PitchClass): Tuning;
}

/** Exact size of a spelled pitch above C4 (C4 itself may be tuned away from 1/1 by some tables). */
export function pitchSize(tuning: Tuning, p: SpelledPitch): PitchRatio {
  return multiply(tuning.classSize(p), power(ratio(2), octavesFromC4(p)));
}

/** Moves a size by whole octaves to lie within half an octave of `target` cents. */
export function nearCents(size: PitchRatio, target: number): PitchRatio {
  const shift = Math.round((target - cents(size)) / 1200);
  return shift === 0 ? size : multiply(size, power(ratio(2), shift));
}

/** A regular temperament: every fifth has the same size, every spelling its own pitch. */
export function regularTuning(fifth: PitchRatio, origin: PitchClass = pitchClass(0)): Tuning {
  const cache = new Map<number, PitchRatio>();
  const tuning: Tuning = {
    kind: 'regular',
    origin,
    classSize(pc) {
      let size = cache.get(pc.fifths);
      if (size === undefined) {
        size = power(fifth, pc.fifths);
        cache.set(pc.fifths, size);
      }
      return size;
    },
    withTonic: () => tuning,
  };
  return tuning;
}

/**
 * Just intonation: an exact ratio above the tonic for each listed degree, keyed by the degree's
 * line-of-fifths distance from the tonic (0 tonic, 1 fifth, 4 major third, −3 minor third …).
 * A spelling the table does not list is reached from the nearest listed degree by pure fifths.
 */
export function justTuning(degrees: ReadonlyMap<number, PitchRatio>, tonic: PitchClass): Tuning {
  if (!degrees.has(0)) throw new RangeError('a just table must list its tonic');
  const listed = [...degrees.keys()].sort((a, b) => a - b);
  const tonicSize = power(PURE_FIFTH, tonic.fifths);
  const cache = new Map<number, PitchRatio>();
  const tuning: Tuning = {
    kind: 'just',
    origin: tonic,
    classSize(pc) {
      let size = cache.get(pc.fifths);
      if (size !== undefined) return size;
      const distance = pc.fifths - tonic.fifths;
      let nearest = listed[0] ?? 0;
      for (const d of listed) if (Math.abs(d - distance) <= Math.abs(nearest - distance)) nearest = d;
      const degree = degrees.get(nearest) ?? UNISON;
      const fromTonic = multiply(nearCents(degree, 700 * nearest), power(PURE_FIFTH, distance - nearest));
      size = multiply(tonicSize, fromTonic);
      cache.set(pc.fifths, size);
      return size;
    },
    withTonic: (next) => (next.fifths === tonic.fifths ? tuning : justTuning(degrees, next)),
  };
  return tuning;
}

/**
 * Adaptive just intonation: pitches follow the harmony (an `AdaptiveTuner` places each note
 * against what sounds); the tuning itself is the fixed just table behind it, used where nothing
 * sounds (charts, previews, the level the tuner returns to), plus the tuner's settings.
 */
export interface AdaptiveJustTuning extends Tuning {
  readonly kind: 'just-adaptive';
  readonly settings: AdaptiveSettings;
  withTonic(tonic: PitchClass): AdaptiveJustTuning;
}

export function adaptiveJustTuning(table: Tuning, settings: AdaptiveSettings): AdaptiveJustTuning {
  const tuning: AdaptiveJustTuning = {
    kind: 'just-adaptive',
    origin: table.origin,
    settings,
    classSize: (pc) => table.classSize(pc),
    withTonic: (tonic) => (tonic.fifths === table.origin.fifths ? tuning : adaptiveJustTuning(table.withTonic(tonic), settings)),
  };
  return tuning;
}

export function isAdaptive(tuning: Tuning): tuning is AdaptiveJustTuning {
  return tuning.kind === 'just-adaptive';
}

/**
 * A 12-tone circulating table (a well temperament): one size per chroma, relative to the origin;
 * every spelling of a key shares its pitch.
 */
export function circulatingTuning(byChroma: readonly PitchRatio[], origin: PitchClass = pitchClass(0)): Tuning {
  if (byChroma.length !== 12) throw new RangeError('a circulating table needs 12 sizes, one per chroma');
  const originChroma = chromaOf(origin);
  const originSize = power(PURE_FIFTH, origin.fifths);
  const cache = new Map<number, PitchRatio>();
  const tuning: Tuning = {
    kind: 'circulating',
    origin,
    classSize(pc) {
      let size = cache.get(pc.fifths);
      if (size !== undefined) return size;
      const step = (chromaOf(pc) - originChroma + 12) % 12;
      const fromOrigin = byChroma[step] ?? UNISON;
      size = nearCents(multiply(originSize, fromOrigin), 700 * pc.fifths);
      cache.set(pc.fifths, size);
      return size;
    },
    withTonic: () => tuning,
  };
  return tuning;
}

/**
 * The sizes of a circulating table built from a chain of 12 spellings joined by 11 fifths of the
 * given sizes (`start`, `start`+1 fifth, …), returned per chroma step above `origin`.
 */
export function chainToChromaSizes(start: PitchClass, fifths: readonly PitchRatio[], origin: PitchClass): PitchRatio[] {
  if (fifths.length !== 11) throw new RangeError('a chain of 12 notes needs 11 fifths');
  const along: PitchRatio[] = [UNISON];
  for (const f of fifths) along.push(multiply(along[along.length - 1] ?? UNISON, f));
  const originIndex = origin.fifths - start.fifths;
  const originSize = along[originIndex];
  if (originIndex < 0 || originIndex > 11 || originSize === undefined) throw new RangeError('the origin must lie on the chain');
  const byChroma: PitchRatio[] = new Array<PitchRatio>(12).fill(UNISON);
  along.forEach((size, i) => {
    const fromOrigin = multiply(size, power(originSize, -1));
    const step = (chromaOf(pitchClass(start.fifths + i)) - chromaOf(origin) + 12) % 12;
    byChroma[step] = nearCents(fromOrigin, 100 * step);
  });
  return byChroma;
}

