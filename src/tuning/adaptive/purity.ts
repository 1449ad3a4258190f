import type { SpelledPitch } from '../../pitch/index.js';

/**
 * What a listener can measure of a performance: notes starting at a frequency, notes whose
 * frequency changes while they sound, notes ending. The spelling, when known, decides what an
 * interval is (a diminished fourth is no third); without it the nearest 12-ET size decides.
 * Taking events instead of the tuner's own answers lets the same measure run on what the engine
 * sends, as the reference synth sounds it.
 */
export type SoundingEvent =
  | { readonly kind: 'on'; readonly time: number; readonly id: number | string; readonly hz: number; readonly pitch?: SpelledPitch }
  | { readonly kind: 'change'; readonly time: number; readonly id: number | string; readonly hz: number }
  | { readonly kind: 'off'; readonly time: number; readonly id: number | string };

export type ConsonanceFamily = 'fifth/fourth' | 'major third/minor sixth' | 'minor third/major sixth';
export const CONSONANCE_FAMILIES: readonly ConsonanceFamily[] = ['fifth/fourth', 'major third/minor sixth', 'minor third/major sixth'];

export interface FamilyDeviation {
  readonly count: number;
  /** Mean |deviation from pure| in cents. */
  readonly meanAbs: number;
  readonly maxAbs: number;
}

export interface PurityReport {
  /** Every interval counted once, when its second note starts (and again if a note moves). */
  readonly byFamily: Readonly<Record<ConsonanceFamily, FamilyDeviation>>;
  readonly all: FamilyDeviation;
  /** Frequency changes of notes that were sounding. */
  readonly moved: number;
  readonly notes: number;
}

/**
 * Pure sizes within the octave, in cents, by line-of-fifths distance from the lower note
 * (just ratios: common practice, no source): 3/2, 4/3, 5/4, 8/5, 6/5, 5/3.
 */
const PURE_BY_FIFTHS: ReadonlyMap<number, { cents: number; family: ConsonanceFamily }> = new Map([
  [1, { cents: 1200 * Math.log2(3 / 2), family: 'fifth/fourth' as const }],
  [-1, { cents: 1200 * Math.log2(4 / 3), family: 'fifth/fourth' as const }],
  [4, { cents: 1200 * Math.log2(5 / 4), family: 'major third/minor sixth' as const }],
  [-4, { cents: 1200 * Math.log2(8 / 5), family: 'major third/minor sixth' as const }],
  [-3, { cents: 1200 * Math.log2(6 / 5), family: 'minor third/major sixth' as const }],
  [3, { cents: 1200 * Math.log2(5 / 3), family: 'minor third/major sixth' as const }],
]);
/** The same by 12-ET semitones within the octave, for notes without a spelling. */
const FIFTHS_BY_SEMITONES: ReadonlyMap<number, number> = new Map([[7, 1], [5, -1], [4, 4], [8, -4], [3, -3], [9, 3]]);

interface Sounding {
  hz: number;
  readonly pitch: SpelledPitch | undefined;
}

/** Which consonance two notes make and how far from pure, or undefined when they make none. */
export function consonanceDeviation(
  a: { readonly hz: number; readonly pitch?: SpelledPitch | undefined },
  b: { readonly hz: number; readonly pitch?: SpelledPitch | undefined },
): { family: ConsonanceFamily; deviation: number } | undefined {
  const [lo, hi] = a.hz <= b.hz ? [a, b] : [b, a];
  const size = 1200 * Math.log2(hi.hz / lo.hz);
  const fifths = lo.pitch && hi.pitch ? hi.pitch.fifths - lo.pitch.fifths : FIFTHS_BY_SEMITONES.get(((Math.round(size / 100) % 12) + 12) % 12);
  const pure = fifths === undefined ? undefined : PURE_BY_FIFTHS.get(fifths);
  if (!pure) return undefined;
  const d = size - pure.cents;
  return { family: pure.family, deviation: d - 1200 * Math.round(d / 1200) };
}

/** Mean |deviation from pure| of every fifth, fourth, third and sixth that sounds, and the notes moved while sounding. */
export function measurePurity(events: Iterable<SoundingEvent>): PurityReport {
  const sounding = new Map<number | string, Sounding>();
  const sums = new Map<ConsonanceFamily, { count: number; sum: number; max: number }>(CONSONANCE_FAMILIES.map((f) => [f, { count: 0, sum: 0, max: 0 }]));
  let moved = 0;
  let notes = 0;
  const pairWithSounding = (id: number | string, note: Sounding): void => {
    for (const [otherId, other] of sounding) {
      if (otherId === id) continue;
      const c = consonanceDeviation(note, other);
      if (!c) continue;
      const s = sums.get(c.family)!;
      s.count++;
      s.sum += Math.abs(c.deviation);
      s.max = Math.max(s.max, Math.abs(c.deviation));
    }
  };
  for (const e of events) {
    if (e.kind === 'on') {
      notes++;
      const note: Sounding = { hz: e.hz, pitch: e.pitch };
      pairWithSounding(e.id, note);
      sounding.set(e.id, note);
    } else if (e.kind === 'change') {
      const note = sounding.get(e.id);
      if (!note || note.hz === e.hz) continue;
      moved++;
      note.hz = e.hz;
      pairWithSounding(e.id, note);
    } else {
      sounding.delete(e.id);
    }
  }
  const summary = (s: { count: number; sum: number; max: number }): FamilyDeviation => ({ count: s.count, meanAbs: s.count ? s.sum / s.count : 0, maxAbs: s.max });
  const total = [...sums.values()].reduce((t, s) => ({ count: t.count + s.count, sum: t.sum + s.sum, max: Math.max(t.max, s.max) }), { count: 0, sum: 0, max: 0 });
  return {
    byFamily: Object.fromEntries(CONSONANCE_FAMILIES.map((f) => [f, summary(sums.get(f)!)])) as Record<ConsonanceFamily, FamilyDeviation>,
    all: summary(total),
    moved,
    notes,
  };
}

/**
 * Drift of one pitch class over a performance — the tonic's, given the piece's final: the cents
 * from the first onset where it is the lowest note sounding to the last such onset, octaves
 * removed. Undefined when it never sounds in the bass.
 */
export function bassDrift(events: Iterable<SoundingEvent>, fifths: number): number | undefined {
  const sounding = new Map<number | string, number>();
  let first: number | undefined;
  let last: number | undefined;
  let pending: Array<{ hz: number; fifths: number | undefined }> = [];
  let pendingTime = NaN;
  const settle = (): void => {
    if (pending.length === 0) return;
    const lowest = Math.min(...sounding.values());
    for (const p of pending) {
      if (p.fifths !== fifths || p.hz > lowest) continue;
      const c = 1200 * Math.log2(p.hz);
      first ??= c;
      last = c;
    }
    pending = [];
  };
  for (const e of events) {
    if (e.time !== pendingTime) settle();
    pendingTime = e.time;
    if (e.kind === 'on') {
      sounding.set(e.id, e.hz);
      pending.push({ hz: e.hz, fifths: e.pitch?.fifths });
    } else if (e.kind === 'change') {
      if (sounding.has(e.id)) sounding.set(e.id, e.hz);
    } else {
      sounding.delete(e.id);
    }
  }
  settle();
  if (first === undefined || last === undefined) return undefined;
  const d = last - first;
  return d - 1200 * Math.round(d / 1200);
}
