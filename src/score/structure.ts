import type { Jump, Score, ScoreMeasure } from './score.js';

type Marked = Pick<ScoreMeasure, 'index' | 'firstGroup' | 'endGroup' | 'repeatStart' | 'repeatEnd' | 'endings' | 'segno' | 'coda' | 'daCapo' | 'dalSegno' | 'toCoda' | 'fine'>;

/** The last group at or before the end of measure `m`, or −1. */
function lastGroupOf(measures: readonly Marked[], m: number): number {
  for (let i = m; i >= 0; i--) {
    const measure = measures[i]!;
    if (measure.endGroup > measure.firstGroup) return measure.endGroup - 1;
  }
  return -1;
}

/** The first group at or after the start of measure `m`, or −1. */
function firstGroupOf(measures: readonly Marked[], m: number): number {
  for (let i = m; i < measures.length; i++) {
    const measure = measures[i]!;
    if (measure.endGroup > measure.firstGroup) return measure.firstGroup;
  }
  return -1;
}

/** Where each repeated section starts: the forward repeat before it, else just after the previous backward repeat, else the start. */
function sectionStarts(measures: readonly Marked[]): Map<number, number> {
  const starts = new Map<number, number>();
  let start = 0;
  for (const m of measures) {
    if (m.repeatStart) start = m.index;
    if (m.repeatEnd > 0) {
      starts.set(m.index, start);
      // a first ending's repeat goes back to the same start as the second's
      if (m.endings.length === 0) start = m.index + 1;
    }
    if (m.endings.length === 0 && m.repeatEnd === 0 && measures[m.index - 1]?.endings.length) start = m.index;
  }
  return starts;
}

/**
 * Every jump the written structure allows, as edges between onset groups: each backward repeat
 * back to its section's start, the measure before a first ending on to each later ending, da
 * capo to the start, dal segno to the segno, to coda on to the coda. The follower treats each as
 * possible, never required, so a repeat may be taken or not.
 */
export function jumpsOf(measures: readonly Marked[]): Jump[] {
  const jumps: Jump[] = [];
  const add = (fromMeasure: number, toMeasure: number, kind: Jump['kind']): void => {
    const from = lastGroupOf(measures, fromMeasure);
    const to = firstGroupOf(measures, toMeasure);
    if (from < 0 || to < 0 || to === from + 1) return;
    if (!jumps.some((j) => j.from === from && j.to === to)) jumps.push({ from, to, kind });
  };
  const starts = sectionStarts(measures);
  for (const m of measures) {
    const start = starts.get(m.index);
    if (start !== undefined) add(m.index, start, 'repeat');
  }
  // endings: the measure before the first ending block goes on to each later block
  for (let i = 0; i < measures.length; i++) {
    const m = measures[i]!;
    if (m.endings.length === 0 || measures[i - 1]?.endings.length) continue;
    const before = i - 1;
    let j = i;
    while (j < measures.length && measures[j]!.endings.length > 0) {
      const blockStart = j;
      const numbers = measures[j]!.endings;
      while (j < measures.length && measures[j]!.endings === numbers) j++;
      if (blockStart !== i && before >= 0) add(before, blockStart, 'ending');
    }
    i = j - 1;
  }
  for (const m of measures) {
    if (m.daCapo) add(m.index, 0, 'da-capo');
    if (m.dalSegno !== undefined) {
      const target = measures.find((t) => t.segno === m.dalSegno) ?? measures.find((t) => t.segno !== undefined);
      if (target) add(m.index, target.index, 'dal-segno');
    }
    if (m.toCoda !== undefined) {
      const target = measures.find((t) => t.index > m.index && t.coda !== undefined && t.toCoda === undefined);
      if (target) add(m.index, target.index, 'to-coda');
    }
  }
  return jumps;
}

/**
 * The measures in the order a player plays them taking every repeat (and the written endings on
 * each pass), then da capo / dal segno without repeats up to the fine or on to the coda (the
 * common-practice reading of these signs, no source).
 */
export function unfoldMeasures(score: Pick<Score, 'measures'>): number[] {
  const measures = score.measures;
  const order: number[] = [];
  const played = new Map<number, number>();
  const starts = sectionStarts(measures);
  let pass = 1;
  let afterJump = false;
  let i = 0;
  let guard = 0;
  while (i < measures.length && guard++ < 100_000) {
    const m = measures[i]!;
    const skipped = afterJump ? m.endings.length === 1 && m.endings[0] === 1 : m.endings.length > 0 && !m.endings.includes(pass);
    if (skipped) {
      i++;
      continue;
    }
    if (m.endings.length === 0 && measures[i - 1]?.endings.length) pass = 1;
    order.push(i);
    if (afterJump && m.fine) break;
    if (afterJump && m.toCoda !== undefined) {
      const coda = measures.find((t) => t.index > i && t.coda !== undefined && t.toCoda === undefined);
      if (coda) {
        i = coda.index;
        continue;
      }
    }
    if (m.repeatEnd > 0 && !afterJump) {
      const done = played.get(i) ?? 1;
      if (done < m.repeatEnd) {
        played.set(i, done + 1);
        pass = done + 1;
        i = starts.get(i) ?? 0;
        continue;
      }
      played.delete(i);
    }
    if ((m.daCapo || m.dalSegno !== undefined) && !afterJump) {
      afterJump = true;
      pass = 1;
      const segno = m.dalSegno === undefined ? undefined : (measures.find((t) => t.segno === m.dalSegno) ?? measures.find((t) => t.segno !== undefined));
      i = segno ? segno.index : 0;
      continue;
    }
    i++;
  }
  return order;
}
