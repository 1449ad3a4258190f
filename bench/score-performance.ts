import { seededRandom } from './random.js';
// A seeded generator of performances of a score, for the score-following tests and bench.
//
// A performance plays the score's measures in an order (every repeat taken, or one skipped, or a
// restart at another bar), at a tempo that drifts (a slow curve plus rubato), with each chord's
// onset jittered and its notes spread, and with mistakes and ornaments at given rates:
//   wrong     a written note played a key or two off (it is not the written note)
//   extra     a note the score does not have, added beside a written one
//   dropped   a written note left out
//   ornament  an unwritten trill, mordent or appoggiatura before a written note, a trill through the
//             note's whole length, or a chord arpeggiated
// Every played note carries what it truly is: a written note (its group and written spelling), or
// not one of the score's notes. Deterministic for a seed.
import type { SpelledPitch } from '../src/pitch/index.js';
import type { Score } from '../src/score/score.js';
import { unfoldMeasures } from '../src/score/structure.js';

export interface PerformanceOptions {
  readonly seed: number;
  /** Milliseconds per quarter note at the start. */
  readonly msPerQuarter: number;
  /** Depth of the slow tempo curve (0.15: ±15 %) and of the note-to-note rubato. */
  readonly tempoCurve: number;
  readonly rubato: number;
  /** Onset jitter of each chord (ms, ±) and how far its notes spread (ms, up to). */
  readonly jitterMs: number;
  readonly spreadMs: number;
  /** The left hand (notes below middle C) early or late against the right by up to this many ms, chord by chord. */
  readonly handsApartMs: number;
  /** Rates per written note. */
  readonly wrong: number;
  readonly extra: number;
  readonly dropped: number;
  readonly ornament: number;
  /** Skip the first repeat (play on instead of going back). */
  readonly skipRepeat: boolean;
  /** Stop somewhere after the first third and start again at another bar, this many times. */
  readonly restarts: number;
}

export const CLEAN: PerformanceOptions = {
  seed: 1,
  msPerQuarter: 500,
  tempoCurve: 0.15,
  rubato: 0.05,
  jitterMs: 8,
  spreadMs: 30,
  handsApartMs: 0,
  wrong: 0,
  extra: 0,
  dropped: 0,
  ornament: 0,
  skipRepeat: false,
  restarts: 0,
};

export interface PlayedNote {
  readonly time: number;
  readonly key: number;
  /** The written note it plays (group and spelling), or undefined for a note the score does not have. */
  readonly group: number | undefined;
  readonly written: SpelledPitch | undefined;
  /** Set on the first note after a restart or a jump back (a repeat taken). */
  readonly jump?: 'restart' | 'repeat' | undefined;
}


/** The measures in playing order, with a repeat skipped or restarts as asked. */
function measurePath(score: Score, options: PerformanceOptions, rand: () => number): { path: number[]; jumps: Map<number, 'restart' | 'repeat'> } {
  let path = unfoldMeasures(score);
  if (options.skipRepeat) {
    const i = path.findIndex((m, k) => k + 1 < path.length && path[k + 1]! <= m);
    if (i >= 0) {
      let j = i + 1;
      while (j < path.length && path[j]! <= path[i]!) j++;
      path = [...path.slice(0, i + 1), ...path.slice(j)];
    }
  }
  const jumps = new Map<number, 'restart' | 'repeat'>();
  for (let r = 0; r < options.restarts; r++) {
    const cut = Math.floor(path.length * (0.3 + 0.4 * rand()));
    let to = cut;
    for (let tries = 0; tries < 50 && Math.abs(to - cut) < 8; tries++) to = Math.floor(rand() * (path.length - 4));
    path = [...path.slice(0, cut), ...path.slice(to)];
    jumps.set(cut, 'restart');
  }
  path.forEach((m, i) => {
    if (i > 0 && m <= path[i - 1]! && !jumps.has(i)) jumps.set(i, 'repeat');
  });
  return { path, jumps };
}

export function perform(score: Score, options: PerformanceOptions): PlayedNote[] {
  const rand = seededRandom(options.seed);
  const pick = <T>(list: readonly T[]): T => list[Math.floor(rand() * list.length)]!;
  const { path, jumps } = measurePath(score, options, rand);
  const notes: PlayedNote[] = [];
  let clock = 0; // ms
  let quarters = 0; // quarter notes played so far, for the tempo curve
  const phase = rand() * Math.PI * 2;
  path.forEach((m, step) => {
    const measure = score.measures[m]!;
    let jump = jumps.get(step);
    if (jump === 'restart') clock += 1500; // a pause before starting again
    let previousTime = measure.start;
    for (let g = measure.firstGroup; g < measure.endGroup; g++) {
      const group = score.groups[g]!;
      const dq = group.time - previousTime;
      previousTime = group.time;
      const tempo = options.msPerQuarter * (1 + options.tempoCurve * Math.sin(phase + (2 * Math.PI * quarters) / 32)) * (1 + options.rubato * (2 * rand() - 1));
      clock += dq * tempo;
      quarters += dq;
      const onset = clock + options.jitterMs * (2 * rand() - 1);
      const spread = options.spreadMs * rand();
      const apart = options.handsApartMs * (2 * rand() - 1);
      const arpeggio = group.keys.length > 2 && rand() < options.ornament;
      const order = [...group.notes.filter((n, i, all) => all.findIndex((o) => o.key === n.key) === i)].sort((a, b) => (arpeggio ? a.key - b.key : rand() - 0.5));
      // grace groups sound just before their main note: pull them earlier
      const shift = group.optional && group.notes.every((n) => n.grace) ? -60 : 0;
      order.forEach((n, i) => {
        let time = onset + shift + (arpeggio ? i * 40 : (spread * i) / Math.max(1, order.length - 1)) + (n.key < 60 ? apart : 0);
        const mark = jump;
        jump = undefined;
        if (rand() < options.dropped) return;
        if (rand() < options.ornament) {
          // an unwritten ornament before the note: trill (from above), mordent, or appoggiatura
          const up = n.key + (rand() < 0.5 ? 1 : 2);
          const down = n.key - (rand() < 0.5 ? 1 : 2);
          const kind = pick(['trill', 'mordent', 'appoggiatura', 'long trill'] as const);
          if (kind === 'long trill') {
            // on the beat from the upper note, then the note and its upper neighbour in turn, through the written length
            const next = score.groups[g + 1];
            const length = next && next.measure === group.measure ? (next.time - group.time) * tempo : 0;
            const count = Math.max(2, Math.floor(length / 65));
            for (let j = 0; j < count; j++) {
              const main = j % 2 === 1;
              notes.push(main && j === 1 ? { time: time + j * 65, key: n.key, group: g, written: n.pitch } : { time: time + j * 65, key: main ? n.key : up, group: undefined, written: undefined, jump: j === 0 ? mark : undefined });
            }
            return;
          }
          const figure = kind === 'trill' ? [up, n.key, up, n.key, up] : kind === 'mordent' ? [n.key, down] : [up];
          const step = kind === 'trill' ? 55 : 70;
          figure.forEach((k, j) => notes.push({ time: time + j * step, key: k, group: undefined, written: undefined, jump: j === 0 ? mark : undefined }));
          time += figure.length * step;
          notes.push({ time, key: n.key, group: g, written: n.pitch });
          return;
        }
        if (rand() < options.wrong) {
          notes.push({ time, key: n.key + pick([-2, -1, 1, 2]), group: undefined, written: undefined, jump: mark });
          return;
        }
        notes.push({ time, key: n.key, group: g, written: n.pitch, jump: mark });
        if (rand() < options.extra) notes.push({ time: time + 15 + 30 * rand(), key: n.key + pick([-2, -1, 1, 2, 12, -12]), group: undefined, written: undefined });
      });
    }
    const rest = measure.start + measure.length - previousTime;
    clock += rest * options.msPerQuarter;
    quarters += rest;
  });
  return notes.filter((n) => n.key >= 0 && n.key <= 127).sort((a, b) => a.time - b.time);
}
