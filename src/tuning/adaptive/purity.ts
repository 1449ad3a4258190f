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
  /** Every interval between distinct pitches counted once, when it forms (and again if a note moves). */
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

/** Two notes of one spelling (when known) within 0.01 cent: a unison doubling, heard as one pitch. */
function sameSound(a: Sounding, b: Sounding): boolean {
  const samePitch = a.pitch && b.pitch ? a.pitch.fifths === b.pitch.fifths && a.pitch.octave === b.pitch.octave : true;
  return samePitch && Math.abs(1200 * Math.log2(a.hz / b.hz)) < 0.01;
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

/**
 * Mean |deviation from pure| of every fifth, fourth, third and sixth that sounds, and the notes
 * moved while sounding.
 *
 * Events are taken a timestamp at a time. An interval is counted when it forms: once both of its
 * pitches sound and one of them did not sound just before (a new note, or a note that moved).
 * Pitches, not notes, are paired: parts in unison (one spelling, within 0.01 cent) sound one
 * pitch, and a synth sounds them on one key, so a doubled part does not count its intervals twice;
 * nor does a note struck again at the pitch it had (a repeated note, or a unison re-struck on its
 * synth key) count again the intervals that merely go on sounding through it.
 */
export function measurePurity(events: Iterable<SoundingEvent>): PurityReport {
  const sounding = new Map<number | string, Sounding>();
  const sums = new Map<ConsonanceFamily, { count: number; sum: number; max: number }>(CONSONANCE_FAMILIES.map((f) => [f, { count: 0, sum: 0, max: 0 }]));
  let moved = 0;
  let notes = 0;
  let before: Sounding[] = [];
  let changed = false;
  let stepTime = NaN;
  const settle = (): void => {
    if (!changed) return;
    changed = false;
    const now: Sounding[] = [];
    for (const note of sounding.values()) if (!now.some((p) => sameSound(p, note))) now.push({ ...note });
    for (let i = 0; i < now.length; i++) {
      const fresh = !before.some((p) => sameSound(p, now[i]!));
      for (let k = 0; k < now.length; k++) {
        if (k === i) continue;
        // a pair with two fresh pitches is counted once, from its first
        if (!fresh || (k < i && !before.some((p) => sameSound(p, now[k]!)))) continue;
        const c = consonanceDeviation(now[i]!, now[k]!);
        if (!c) continue;
        const s = sums.get(c.family)!;
        s.count++;
        s.sum += Math.abs(c.deviation);
        s.max = Math.max(s.max, Math.abs(c.deviation));
      }
    }
    before = now;
  };
  for (const e of events) {
    if (e.time !== stepTime) settle();
    stepTime = e.time;
    if (e.kind === 'on') {
      notes++;
      sounding.set(e.id, { hz: e.hz, pitch: e.pitch });
      changed = true;
    } else if (e.kind === 'change') {
      const note = sounding.get(e.id);
      if (!note || note.hz === e.hz) continue;
      moved++;
      note.hz = e.hz;
      changed = true;
    } else if (sounding.delete(e.id)) {
      changed = true;
    }
  }
  settle();
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
 * Drift of the tonic over a performance: where one pitch class (the tonic's: the piece's final
 * bass) sounds in the bass at its last onset there against its first, octaves removed, in cents.
 * At each of the two times every note of that class beginning then as the lowest pitch sounding
 * counts (their mean). In the bass the class is nearly always a chord's root, where a level that
 * stays put keeps it; as a chord's third or sixth it may stand a comma from there without any
 * drift (the D of D–F–A against C–E–G). The bass is the lowest pitch sounding, whichever part
 * sounds it: parts in unison share one synth key, and one of them may end first. Undefined when
 * the class never sounds in the bass.
 */
export function tonicDrift(events: Iterable<SoundingEvent>, fifths: number): number | undefined {
  const sounding = new Map<number | string, number>();
  let first: { time: number; cents: number[] } | undefined;
  let last: { time: number; cents: number[] } | undefined;
  let pending: Array<{ hz: number; fifths: number | undefined }> = [];
  let pendingTime = NaN;
  const settle = (): void => {
    if (pending.length === 0) return;
    const lowest = Math.min(...sounding.values());
    for (const p of pending) {
      if (p.fifths !== fifths || p.hz > lowest) continue;
      const c = 1200 * Math.log2(p.hz / 440);
      if (first === undefined) first = { time: pendingTime, cents: [] };
      if (first.time === pendingTime) first.cents.push(c);
      if (last === undefined || last.time !== pendingTime) last = { time: pendingTime, cents: [] };
      last.cents.push(c);
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
  const at = (onset: { cents: number[] }, near: number): number => {
    const reduced = onset.cents.map((c) => c - 1200 * Math.round((c - near) / 1200));
    return reduced.reduce((sum, c) => sum + c, 0) / reduced.length;
  };
  const start = at(first, first.cents[0]!);
  return at(last, start) - start;
}
