// Score following figures: accuracy on clean and on flawed performances made from the corpus's
// scores, notes needed to re-locate after a jump, and the per-note cost of the live path.
// Scores: corpus/mozart-scores (CC BY-NC-SA 4.0, see its LICENSE.md).
import { existsSync, readdirSync, readFileSync } from 'node:fs';
import { loadavg } from 'node:os';
import { join } from 'node:path';
import { performance } from 'node:perf_hooks';
import { samePitch } from '../src/pitch/index.js';
import { readScoreFile } from '../src/presets/score-file.js';
import type { Score } from '../src/score/score.js';
import { ScoreSpeller } from '../src/score/score-speller.js';
import { createStrategy } from '../src/spelling/strategy.js';
import { readMidiFile } from '../src/render/smf.js';
import { parseWrittenSpellings, scoreSpelling, spellEvents } from './accuracy.js';
import { packageRoot } from '../src/util/package-root.js';
import { CLEAN, perform, type PerformanceOptions, type PlayedNote } from './score-performance.js';
import { heading, percentile } from './timing.js';

export const SCORES_DIR = join(packageRoot(), 'corpus', 'mozart-scores');
/** The same movements' onsets as played and their written spellings (CC BY-NC-SA 4.0, corpus/mozart/LICENSE.md). */
const TAKES_DIR = join(packageRoot(), 'corpus', 'mozart');

/** The corpus's own performance (NAME.mid) spelled from the score, against the written spellings in NAME.csv. */
export function corpusTake(name: string, score: Score): { notes: number; correct: number } {
  const midi = readMidiFile(readFileSync(join(TAKES_DIR, `${name}.mid`)), name);
  const speller = new ScoreSpeller(score, createStrategy({ strategy: 'follow' }));
  const result = scoreSpelling(spellEvents(midi.events, speller), parseWrittenSpellings(readFileSync(join(TAKES_DIR, `${name}.csv`), 'utf8')));
  return { notes: result.notes, correct: result.correct };
}

/** A performance with under 3 % wrong, extra and missing notes, and unwritten ornaments. */
export const FLAWED: PerformanceOptions = { ...CLEAN, seed: 2, wrong: 0.01, extra: 0.008, dropped: 0.01, ornament: 0.02, spreadMs: 60, rubato: 0.1 };
/** A repeat skipped and two restarts at other bars. */
export const JUMPY: PerformanceOptions = { ...FLAWED, seed: 3, skipRepeat: true, restarts: 2 };

export interface FollowFigures {
  /** Played notes that are written notes, and how many of them took their written spelling. */
  readonly written: number;
  readonly correct: number;
  readonly played: number;
  /** Notes from each jump to the first note matched to its true place (or one identical to it). */
  readonly relocations: Array<{ kind: 'restart' | 'repeat'; notes: number }>;
  /** Microseconds per `spell` call, one note at a time, as live with no chord gathering. */
  readonly costs: number[];
}

/** Two groups are the same place for the player if they are, or if they and their predecessors hold the same notes. */
function samePlace(score: Score, a: number, b: number): boolean {
  if (a === b) return true;
  for (let d = 0; d < 3; d++) {
    const x = score.groups[a - d];
    const y = score.groups[b - d];
    if (!x || !y || x.keys.join() !== y.keys.join()) return false;
  }
  return true;
}

/** Plays a performance into a ScoreSpeller (with `follow` as the fallback) note by note and scores it. */
export function followPerformance(score: Score, notes: readonly PlayedNote[], timed = false): FollowFigures {
  const speller = new ScoreSpeller(score, createStrategy({ strategy: 'follow' }));
  let written = 0;
  let correct = 0;
  const relocations: FollowFigures['relocations'] = [];
  const costs: number[] = [];
  let pending: { kind: 'restart' | 'repeat'; since: number } | undefined;
  notes.forEach((n, i) => {
    if (n.jump) pending = { kind: n.jump, since: i };
    const context = { key: n.key, velocity: 64, time: n.time, channel: 0, source: 0 };
    const start = timed ? performance.now() : 0;
    const [pitch] = speller.spell([context]);
    if (timed) costs.push((performance.now() - start) * 1000);
    if (n.written) {
      written++;
      if (pitch && samePitch(pitch, n.written)) correct++;
      const matched = speller.lastMatches()[0];
      if (pending && n.group !== undefined && matched?.match === 'score' && samePlace(score, speller.follower.group, n.group)) {
        relocations.push({ kind: pending.kind, notes: i - pending.since + 1 });
        pending = undefined;
      }
    }
  });
  return { written, correct, played: notes.length, relocations, costs };
}

export function scoreNames(): string[] {
  if (!existsSync(SCORES_DIR)) return [];
  return readdirSync(SCORES_DIR)
    .filter((f) => f.endsWith('.mxl'))
    .map((f) => f.replace(/\.mxl$/u, ''))
    .sort();
}

const pct = (c: number, n: number): string => (n === 0 ? '–' : `${((100 * c) / n).toFixed(2)}%`);

export function benchScore(names: readonly string[] = scoreNames()): void {
  if (names.length === 0) {
    process.stdout.write('\n(score bench skipped: corpus/mozart-scores not found)\n');
    return;
  }
  heading('score following on performances made from corpus/mozart-scores (notes spelled as written)');
  process.stdout.write('corpus: the corpus\'s own take (corpus/mozart/NAME.mid) against its written spellings; made: clean, flawed and jumpy performances from bench/score-performance.ts\n');
  process.stdout.write(`${'movement'.padEnd(13)}${'notes'.padStart(7)}${'corpus'.padStart(9)}${'clean'.padStart(9)}${'flawed'.padStart(9)}${'jumps'.padStart(9)}  re-locate (notes)\n`);
  const totals = { corpus: [0, 0], clean: [0, 0], flawed: [0, 0], jumpy: [0, 0] };
  const restarts: number[] = [];
  const repeats: number[] = [];
  let costs: number[] = [];
  let nearest = { name: '', notes: 0, score: undefined as Score | undefined, performance: [] as PlayedNote[] };
  for (const name of names) {
    const score = readScoreFile(join(SCORES_DIR, `${name}.mxl`));
    const take = corpusTake(name, score);
    totals.corpus[0]! += take.correct;
    totals.corpus[1]! += take.notes;
    const clean = followPerformance(score, perform(score, CLEAN));
    const flawedNotes = perform(score, FLAWED);
    const flawed = followPerformance(score, flawedNotes, true);
    const jumpy = followPerformance(score, perform(score, JUMPY));
    totals.clean[0]! += clean.correct;
    totals.clean[1]! += clean.written;
    totals.flawed[0]! += flawed.correct;
    totals.flawed[1]! += flawed.written;
    totals.jumpy[0]! += jumpy.correct;
    totals.jumpy[1]! += jumpy.written;
    for (const r of [...clean.relocations, ...jumpy.relocations]) (r.kind === 'restart' ? restarts : repeats).push(r.notes);
    costs = costs.concat(flawed.costs.slice(20)); // past the first notes' compilation
    if (Math.abs(flawedNotes.length - 3000) < Math.abs(nearest.notes - 3000)) nearest = { name, notes: flawedNotes.length, score, performance: flawedNotes };
    const relocs = jumpy.relocations.filter((r) => r.kind === 'restart').map((r) => r.notes);
    process.stdout.write(
      `${name.padEnd(13)}${String(take.notes).padStart(7)}${pct(take.correct, take.notes).padStart(9)}${pct(clean.correct, clean.written).padStart(9)}${pct(flawed.correct, flawed.written).padStart(9)}${pct(jumpy.correct, jumpy.written).padStart(9)}  ${relocs.join(', ') || '–'}\n`,
    );
  }
  const sorted = (list: number[]): number[] => [...list].sort((a, b) => a - b);
  const r = sorted(restarts);
  const rp = sorted(repeats);
  const c = sorted(costs);
  // the movement nearest 3,000 played notes, five times: each note's least time is its cost without preemption
  const runs = nearest.score ? Array.from({ length: 5 }, () => followPerformance(nearest.score!, nearest.performance, true).costs) : [];
  const single = sorted(runs[0] ?? []);
  const least = sorted((runs[0] ?? []).map((_, i) => Math.min(...runs.map((r) => r[i]!))).slice(20));
  process.stdout.write(`overall: the corpus's own takes ${pct(totals.corpus[0]!, totals.corpus[1]!)} of ${totals.corpus[1]} notes as written (goal ≥ 99.95%)\n`);
  process.stdout.write(`         made clean performances ${pct(totals.clean[0]!, totals.clean[1]!)} of ${totals.clean[1]} written notes (goal ≥ 99.95%)\n`);
  process.stdout.write(`         with ~1% wrong, ~0.8% extra, ~1% dropped notes and 2% unwritten ornaments: ${pct(totals.flawed[0]!, totals.flawed[1]!)} of the notes that belong to the score (goal ≥ 99.8%)\n`);
  process.stdout.write(`         with those, a repeat skipped and two restarts at other bars: ${pct(totals.jumpy[0]!, totals.jumpy[1]!)}\n`);
  process.stdout.write(`re-locating after a restart at another bar: median ${percentile(r, 0.5)} notes, p95 ${percentile(r, 0.95)}, worst ${r[r.length - 1] ?? '–'} (${r.length} restarts)\n`);
  process.stdout.write(`following a repeat taken: median ${percentile(rp, 0.5)} notes, p95 ${percentile(rp, 0.95)} (${rp.length} repeats)\n`);
  process.stdout.write(`per-note cost of ScoreSpeller.spell (follower + follow fallback), all movements: p50 ${percentile(c, 0.5).toFixed(1)} µs, p99 ${percentile(c, 0.99).toFixed(1)} µs, max ${(c[c.length - 1] ?? 0).toFixed(0)} µs\n`);
  process.stdout.write(`  (wall-clock time per call, preemption included: this machine's load average was ${loadavg()[0]!.toFixed(1)} at the end)\n`);
  process.stdout.write(
    `  ${nearest.name} (${nearest.notes} notes played, flawed): one run p50 ${percentile(single, 0.5).toFixed(1)} µs, p99 ${percentile(single, 0.99).toFixed(1)} µs; ` +
      `each note's least of five runs p50 ${percentile(least, 0.5).toFixed(1)} µs, p99 ${percentile(least, 0.99).toFixed(1)} µs, max ${(least[least.length - 1] ?? 0).toFixed(1)} µs (goal p99 < 50 µs)\n`,
  );
}
