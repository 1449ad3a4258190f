import {
  chromaOf,
  formatPitchClass,
  formatSpelledPitch,
  keyOf,
  onKey,
  rangeClasses,
  spelledPitch,
  type FifthsRange,
  type PitchClass,
  type SpelledPitch,
} from '../pitch/index.js';
import {
  analyseInterval,
  cents,
  divide,
  equalTemperedDeviation,
  exactFrequency,
  frequency,
  nearCents,
  PURE_FIFTH_INTERVAL,
  PURE_MAJOR_THIRD,
  type PureInterval,
  type Reference,
  type Tuning,
  type WolfLimits,
} from '../tuning/index.js';
import { outputNumber } from '../text/output-numbers.js';

export interface ChartNote {
  readonly pitch: SpelledPitch;
  readonly fifths: number;
  /** Cents above the tuning's origin, placed by the key (B♯ over C is about 0, not 1200). */
  readonly cents: number;
  readonly hz: number;
  /** The exact frequency as a fraction, when the tuning makes it rational. */
  readonly exactHz: string | undefined;
  /** Cents from the 12-ET pitch of the same key at the same reference. */
  readonly etDeviation: number;
}

export interface ChartEnharmonic {
  readonly sharpward: PitchClass;
  readonly flatward: PitchClass;
  /** Cents of the sharpward spelling minus the flatward one (G♯ − A♭). */
  readonly difference: number;
}

export type IntervalQuality = 'P5' | 'd6' | 'M3' | 'd4';

export interface ChartInterval {
  readonly kind: 'fifth' | 'third';
  readonly quality: IntervalQuality;
  readonly lower: SpelledPitch;
  readonly upper: SpelledPitch;
  readonly cents: number;
  readonly pure: PureInterval;
  readonly deviation: number;
  readonly beats: number;
  readonly wolf: boolean;
}

export interface ChartRequest {
  readonly tuning: Tuning;
  readonly reference: Reference;
  readonly range: FifthsRange;
  readonly octave: number;
  readonly wolfLimits: WolfLimits;
}

export interface Chart extends ChartRequest {
  readonly notes: readonly ChartNote[];
  readonly enharmonics: readonly ChartEnharmonic[];
  readonly intervals: readonly ChartInterval[];
}

/** Cents of a pitch class above the origin, placed near its key's 12-ET distance from the origin. */
export function centsAboveOrigin(tuning: Tuning, pc: PitchClass): number {
  const steps = (chromaOf(pc) - chromaOf(tuning.origin) + 12) % 12;
  return cents(nearCents(divide(tuning.classSize(pc), tuning.classSize(tuning.origin)), 100 * steps));
}

/**
 * The keyboard intervals a player checks: pairs of spellings in the range that lie 7 keys apart
 * (perfect fifths and the diminished sixths that sound as wolf fifths) or 4 keys apart (major
 * thirds and diminished fourths), each measured from the lower note in the chart's octave.
 */
const INTERVAL_KINDS: ReadonlyArray<{ kind: 'fifth' | 'third'; quality: IntervalQuality; fifths: number; keys: number; pure: PureInterval }> = [
  { kind: 'fifth', quality: 'P5', fifths: 1, keys: 7, pure: PURE_FIFTH_INTERVAL },
  { kind: 'fifth', quality: 'd6', fifths: -11, keys: 7, pure: PURE_FIFTH_INTERVAL },
  { kind: 'third', quality: 'M3', fifths: 4, keys: 4, pure: PURE_MAJOR_THIRD },
  { kind: 'third', quality: 'd4', fifths: -8, keys: 4, pure: PURE_MAJOR_THIRD },
];

export function buildChart(request: ChartRequest): Chart {
  const { tuning, reference, range, octave, wolfLimits } = request;
  const classes = rangeClasses(range);
  const hzOf = (p: SpelledPitch): number => frequency(tuning, reference, p);
  const notes = classes.map((pc): ChartNote => {
    const pitch = spelledPitch(pc, octave);
    return {
      pitch,
      fifths: pc.fifths,
      cents: centsAboveOrigin(tuning, pc),
      hz: hzOf(pitch),
      exactHz: exactFrequency(tuning, reference, pitch)?.toFraction(),
      etDeviation: equalTemperedDeviation(tuning, reference, pitch),
    };
  });
  const enharmonics: ChartEnharmonic[] = [];
  for (const sharpward of classes) {
    const flatward = classes.find((pc) => pc.fifths === sharpward.fifths - 12);
    if (!flatward) continue;
    const difference = cents(divide(tuning.classSize(sharpward), tuning.classSize(flatward)));
    enharmonics.push({ sharpward, flatward, difference: difference - 1200 * Math.round(difference / 1200) });
  }
  const intervals: ChartInterval[] = [];
  for (const shape of INTERVAL_KINDS) {
    for (const from of classes) {
      const to = from.fifths + shape.fifths;
      if (to < range.lowest || to > range.highest) continue;
      const lower = spelledPitch(from, octave);
      const upper = onKey({ fifths: to }, keyOf(lower) + shape.keys);
      const analysis = analyseInterval(hzOf(lower), hzOf(upper), { interval: shape.pure, octaves: 0 });
      const limit = shape.kind === 'fifth' ? wolfLimits.fifth : wolfLimits.third;
      intervals.push({ ...shape, lower, upper, ...analysis, pure: shape.pure, wolf: Math.abs(analysis.deviation) > limit });
    }
  }
  return { ...request, notes, enharmonics, intervals };
}

/**
 * The chart as the documented JSON object (field names are stable). Figures are rounded for
 * output (`outputNumber`: cents to 4 places, Hz to 6); `exactHz` keeps the exact value.
 */
export function chartJson(chart: Chart, meta: { id: string; name: string; kind: string; source: string }): unknown {
  const name = (p: SpelledPitch): string => formatSpelledPitch(p);
  const c = (n: number): number => outputNumber(n, 'cents');
  const hz = (n: number): number => outputNumber(n, 'hz');
  return {
    tuning: meta,
    reference: { note: name(chart.reference.pitch), hz: hz(chart.reference.hz.valueOf()) },
    origin: formatPitchClass(chart.tuning.origin),
    octave: chart.octave,
    range: { from: formatPitchClass({ fifths: chart.range.lowest }), to: formatPitchClass({ fifths: chart.range.highest }) },
    wolfLimits: chart.wolfLimits,
    notes: chart.notes.map((n) => ({
      name: name(n.pitch),
      fifths: n.fifths,
      key: keyOf(n.pitch),
      cents: c(n.cents),
      hz: hz(n.hz),
      exactHz: n.exactHz ?? null,
      etDeviation: c(n.etDeviation),
    })),
    enharmonics: chart.enharmonics.map((e) => ({
      sharpward: formatPitchClass(e.sharpward),
      flatward: formatPitchClass(e.flatward),
      difference: c(e.difference),
    })),
    intervals: chart.intervals.map((i) => ({
      kind: i.kind,
      quality: i.quality,
      lower: name(i.lower),
      upper: name(i.upper),
      cents: c(i.cents),
      pure: `${i.pure.p}/${i.pure.q}`,
      deviation: c(i.deviation),
      beats: outputNumber(i.beats, 'beats'),
      wolf: i.wolf,
    })),
  };
}
