// Adaptive just intonation on the corpora: purity of what sounds, drift, notes moved, cost per note.
// The measure (src/tuning/adaptive/purity.ts) takes (time, frequency, on/off) events: from the tuner
// driven directly, and ("via engine") from the reference synth playing the whole engine's output.
import { readFileSync } from 'node:fs';
import { performance } from 'node:perf_hooks';
import { keyOf, parseSpelledPitch, type PitchClass, type SpelledPitch } from '../src/pitch/index.js';
import { loadTuningPreset } from '../src/presets/tuning-presets.js';
import { parseWrittenSpellings } from './accuracy.js';
import { FollowSpeller } from '../src/spelling/follow.js';
import { A440, frequency, type Tuning } from '../src/tuning/index.js';
import { AdaptiveTuner, CONSONANCE_FAMILIES, measurePurity, tonicDrift, type AdaptiveSettings, type PurityReport, type SoundingEvent } from '../src/tuning/adaptive/index.js';
import { soundedThroughEngine, type WrittenNote } from './adaptive-engine.js';
import { corpusDir, loadCorpus, type Movement } from './corpus.js';
import { heading, percentile } from './timing.js';

export type { WrittenNote } from './adaptive-engine.js';

/** A piece as notes with written spellings: the file's timing, the CSV's spellings (matched by tick and key). */
export function writtenNotes(m: Movement): WrittenNote[] {
  const written = new Map<string, string[]>();
  for (const w of parseWrittenSpellings(readFileSync(m.csvPath, 'utf8'))) {
    const key = `${w.tick}:${w.key}`;
    written.set(key, [...(written.get(key) ?? []), w.spelling]);
  }
  const open = new Map<string, Array<{ on: number; pitch: SpelledPitch }>>();
  const notes: WrittenNote[] = [];
  for (const e of m.midi.events) {
    const [status = 0, key = 0, velocity = 0] = e.data;
    const kind = status & 0xf0;
    if (kind !== 0x90 && kind !== 0x80) continue;
    const slot = `${status & 0x0f}:${key}`;
    if (kind === 0x90 && velocity > 0) {
      const spelling = written.get(`${e.tick}:${key}`)?.shift();
      if (spelling === undefined) continue;
      open.set(slot, [...(open.get(slot) ?? []), { on: e.time, pitch: parseSpelledPitch(spelling) }]);
    } else {
      const started = open.get(slot)?.shift();
      if (started) notes.push({ id: notes.length, on: started.on, off: e.time, pitch: started.pitch });
    }
  }
  return notes.sort((a, b) => a.on - b.on || a.id - b.id);
}

/** Note-ons and note-offs in time order, offs first at equal times (a repeated note is re-struck). */
function timeline(notes: readonly WrittenNote[]): Array<{ time: number; ons: WrittenNote[]; offs: WrittenNote[] }> {
  const byTime = new Map<number, { time: number; ons: WrittenNote[]; offs: WrittenNote[] }>();
  const at = (time: number) => {
    let slot = byTime.get(time);
    if (!slot) byTime.set(time, (slot = { time, ons: [], offs: [] }));
    return slot;
  };
  for (const n of notes) {
    at(n.on).ons.push(n);
    at(n.off).offs.push(n);
  }
  return [...byTime.values()].sort((a, b) => a.time - b.time);
}

export interface AdaptiveRun {
  readonly events: SoundingEvent[];
  /** Microseconds per `chordOn` call, divided by its notes. */
  readonly costPerNote: number[];
  /** Sounding notes whose pitch, asked again after a later note, differed from the one last reported (given, or by `tick`). */
  readonly movedInTuner: number;
  readonly compromises: number;
}

/** Drives an `AdaptiveTuner` with a piece's written spellings and timing. */
/**
 * Drives an `AdaptiveTuner` with a piece's written spellings and timing. The key of the table
 * follows the music as the engine's follow speller hears it (its spellings are not used), as
 * the router will do; `tonic` fixes it instead.
 */
export function runAdaptive(notes: readonly WrittenNote[], table: Tuning, settings: Partial<AdaptiveSettings> = {}, tonic?: PitchClass): AdaptiveRun {
  const tuner = new AdaptiveTuner({ table, reference: A440, settings });
  const follow = tonic === undefined ? new FollowSpeller() : undefined;
  const context = (n: WrittenNote, time: number) => ({ key: keyOf(n.pitch), velocity: 64, time, channel: 0, source: 0 });
  tuner.setTonic(tonic);
  const events: SoundingEvent[] = [];
  const costPerNote: number[] = [];
  const given = new Map<number | string, number>();
  let movedInTuner = 0;
  for (const { time, ons, offs } of timeline(notes)) {
    for (const moved of tuner.tick(time)) {
      if (given.get(moved.id) === moved.hz) continue;
      given.set(moved.id, moved.hz);
      events.push({ kind: 'change', time, id: moved.id, hz: moved.hz });
    }
    for (const n of offs) {
      follow?.noteOff(context(n, time));
      tuner.noteOff(time, n.id);
      given.delete(n.id);
      events.push({ kind: 'off', time, id: n.id });
    }
    if (ons.length === 0) continue;
    if (follow) {
      follow.spell(ons.map((n) => context(n, time)));
      tuner.setTonic(follow.currentTonic());
    }
    const start = performance.now();
    const placed = tuner.chordOn(time, ons.map((n) => ({ id: n.id, pitch: n.pitch })));
    costPerNote.push(((performance.now() - start) * 1000) / ons.length);
    for (const p of placed) {
      given.set(p.id, p.hz);
      events.push({ kind: 'on', time, id: p.id, hz: p.hz, pitch: p.pitch });
    }
    for (const s of tuner.soundingNotes()) if (given.get(s.id) !== s.hz) movedInTuner++;
  }
  return { events, costPerNote, movedInTuner, compromises: tuner.counters().compromises };
}

/** The same notes at the fixed frequencies of a static tuning. */
export function fixedEvents(notes: readonly WrittenNote[], tuning: Tuning): SoundingEvent[] {
  const events: SoundingEvent[] = [];
  for (const { time, ons, offs } of timeline(notes)) {
    for (const n of offs) events.push({ kind: 'off', time, id: n.id });
    for (const n of ons) events.push({ kind: 'on', time, id: n.id, hz: frequency(tuning, A440, n.pitch), pitch: n.pitch });
  }
  return events;
}

/** The piece's tonic as the player would declare it: the lowest note of the first onset. */
export function tonicOf(notes: readonly WrittenNote[]): SpelledPitch | undefined {
  const firstOn = Math.min(...notes.map((n) => n.on));
  return notes
    .filter((n) => n.on === firstOn)
    .map((n) => n.pitch)
    .sort((a, b) => keyOf(a) - keyOf(b))[0];
}

/** The piece's final: the lowest note sounding at its last onset (the pitch class whose drift is measured). */
export function finalBassOf(notes: readonly WrittenNote[]): SpelledPitch | undefined {
  const lastOn = Math.max(...notes.map((n) => n.on));
  return notes
    .filter((n) => n.on <= lastOn && n.off > lastOn)
    .map((n) => n.pitch)
    .sort((a, b) => keyOf(a) - keyOf(b))[0];
}

/**
 * The piece's tonic, for the drift measure: its final bass, unless that lies a fifth above the
 * opening bass (a movement ending on a half cadence, as slow movements of the period often do):
 * then the opening bass. (Common practice, no source; the corpora give no key.)
 */
export function pieceTonicOf(notes: readonly WrittenNote[]): SpelledPitch | undefined {
  const opening = tonicOf(notes);
  const final = finalBassOf(notes);
  return opening && final && final.fifths === opening.fifths + 1 ? opening : final;
}

interface Pieces {
  readonly label: string;
  readonly pieces: ReadonlyArray<{ readonly name: string; readonly notes: readonly WrittenNote[] }>;
}

/** Chords of our own, `|` between chords; `~` after a note holds it into the next chord. */
export function progression(text: string, chordMs = 600): WrittenNote[] {
  const chords = text.split('|').map((c) => c.trim().split(/\s+/u));
  const notes: WrittenNote[] = [];
  const open = new Map<string, { on: number; pitch: SpelledPitch }>();
  chords.forEach((chord, i) => {
    const time = i * chordMs;
    const names = chord.map((n) => n.replace(/~$/u, ''));
    for (const [name, o] of open) {
      if (!names.includes(name)) {
        notes.push({ id: notes.length, on: o.on, off: time, pitch: o.pitch });
        open.delete(name);
      }
    }
    chord.forEach((n, k) => {
      const name = names[k]!;
      if (!open.has(name)) open.set(name, { on: time, pitch: parseSpelledPitch(name) });
      if (!n.endsWith('~')) {
        notes.push({ id: notes.length, on: open.get(name)!.on, off: time + chordMs, pitch: open.get(name)!.pitch });
        open.delete(name);
      }
    });
  });
  const end = chords.length * chordMs;
  for (const o of open.values()) notes.push({ id: notes.length, on: o.on, off: end, pitch: o.pitch });
  return notes.sort((a, b) => a.on - b.on || a.id - b.id);
}

/** The comma pump I–vi–ii–V, `rounds` times and a final I: detached, or with every common tone held. */
export function commaPump(rounds: number, legato: boolean): WrittenNote[] {
  const round = legato
    ? ['C3 E4~ G4 C5~', 'A2 E4 A4~ C5', 'D3 F4 A4 D5~', 'G2 B4 D5 G4~']
    : ['C3 E4 G4 C5', 'A2 E4 A4 C5', 'D3 F4 A4 D5', 'G2 B4 D5 G4'];
  return progression([...Array.from({ length: rounds }, () => round).flat(), 'C3 E4 G4 C5'].join(' | '));
}

/** A chorale-like phrase of our own in C major with held common tones, tonicising the dominant and the relative minor. */
export const OWN_CHORALE = progression(
  [
    'C3 G3~ E4~ C5', 'A2 A3 E4~ C5', 'F2 A3 F4 C5~', 'D3 A3 F#4 C5~', 'G2 G3~ D4 B4',
    'E3 G3~ E4 B4~', 'A2 A3 E4 C5', 'E3 G#3 E4 B4', 'A2 A3 E4~ C5', 'F2 A3 E4~ C5~',
    'D3 A3 F4 C5~', 'G2 B3 F4 C5', 'G2 B3 D4 B4', 'C3 G3 E4 C5',
  ].join(' | '),
  800,
);

interface Row {
  readonly label: string;
  readonly purity: PurityReport;
  /** Tonic drift per piece; undefined for a fixed tuning, which cannot drift. */
  readonly drift: number[] | undefined;
  readonly compromises?: number;
  readonly notes?: number;
  readonly moved?: number;
}

/**
 * The player's drift setting at three points (the default, "pure now" and "no drift"), each with
 * the table on the piece's key as a player declares it; and the default with the table following
 * the follow speller's key estimate instead.
 */
const VARIANTS: ReadonlyArray<readonly [string, Partial<AdaptiveSettings>, 'declared' | 'followed']> = [
  ['just-adaptive', {}, 'declared'],
  ['  pure now', { anchor: 0, snap: 0 }, 'declared'],
  ['  no drift', { anchor: 3 }, 'declared'],
  ['  key followed', {}, 'followed'],
];

function rowsFor(group: Pieces, table: Tuning, fixed: ReadonlyArray<readonly [string, Tuning]>) {
  const cost: number[] = [];
  const engineCost: number[] = [];
  const rows: Row[] = [];
  let worst = { name: '-', drift: 0 };
  // Warm up first: a live session compiles its hot paths in its first notes, which are no note's cost.
  for (const piece of group.pieces.slice(0, 8)) {
    if (piece.notes.length === 0) continue;
    runAdaptive(piece.notes, table, {}, tonicOf(piece.notes));
    soundedThroughEngine(piece.notes, table, tonicOf(piece.notes));
  }
  for (const [label, settings, key] of VARIANTS) {
    const events: SoundingEvent[][] = [];
    const drift: number[] = [];
    let moved = 0;
    let compromises = 0;
    let notes = 0;
    for (const piece of group.pieces) {
      if (piece.notes.length === 0) continue;
      const tonic = tonicOf(piece.notes);
      const run = runAdaptive(piece.notes, table, settings, key === 'declared' ? tonic : undefined);
      events.push(run.events);
      if (label === 'just-adaptive') cost.push(...run.costPerNote);
      moved += run.movedInTuner;
      compromises += run.compromises;
      notes += piece.notes.length;
      const home = pieceTonicOf(piece.notes);
      const d = home && tonicDrift(run.events, home.fifths);
      if (d !== undefined) drift.push(d);
      if (d !== undefined && label === 'just-adaptive' && Math.abs(d) > worst.drift) worst = { name: piece.name, drift: Math.abs(d) };
    }
    const purity = measurePurity(events.flat());
    rows.push({ label, purity, drift, compromises, notes, moved: moved + purity.moved });
  }
  {
    // The same through the whole engine (mts-note) into the reference synth, measured from what it sounds.
    const events: SoundingEvent[][] = [];
    const drift: number[] = [];
    for (const piece of group.pieces) {
      if (piece.notes.length === 0) continue;
      const tonic = tonicOf(piece.notes);
      const sounded = soundedThroughEngine(piece.notes, table, tonic, engineCost);
      events.push(sounded);
      const home = pieceTonicOf(piece.notes);
      const d = home && tonicDrift(sounded, home.fifths);
      if (d !== undefined) drift.push(d);
    }
    const purity = measurePurity(events.flat());
    rows.push({ label: '  via engine', purity, drift, moved: purity.moved });
  }
  for (const [label, tuning] of fixed) {
    const events = group.pieces.filter((p) => p.notes.length > 0).flatMap((p) => {
      const tonic = tonicOf(p.notes);
      return fixedEvents(p.notes, tonic ? tuning.withTonic(tonic) : tuning);
    });
    rows.push({ label, purity: measurePurity(events), drift: undefined });
  }
  cost.sort((a, b) => a - b);
  engineCost.sort((a, b) => a - b);
  return { rows, cost, engineCost, worst };
}

const f2 = (n: number): string => n.toFixed(2);

function printGroup(group: Pieces, table: Tuning, fixed: ReadonlyArray<readonly [string, Tuning]>): void {
  const { rows, cost, engineCost, worst } = rowsFor(group, table, fixed);
  const pieces = group.pieces.filter((p) => p.notes.length > 0);
  process.stdout.write(`\n${group.label}: ${pieces.length} piece${pieces.length === 1 ? '' : 's'}, ${pieces.reduce((n, p) => n + p.notes.length, 0)} notes\n`);
  const head = ['tuning'.padEnd(15), ...CONSONANCE_FAMILIES.map((f) => f.padStart(24)), 'all'.padStart(7), 'max|drift|'.padStart(11), 'mean|drift|'.padStart(12), 'compromised'.padStart(12), 'moved'.padStart(6)];
  process.stdout.write(head.join('') + '\n');
  for (const r of rows) {
    const cells = CONSONANCE_FAMILIES.map((f) => `${f2(r.purity.byFamily[f].meanAbs)} (${r.purity.byFamily[f].count})`.padStart(24));
    const drift = r.drift;
    const maxDrift = drift === undefined ? 'fixed' : drift.length ? f2(Math.max(...drift.map(Math.abs))) : '-';
    const meanDrift = drift === undefined ? 'fixed' : drift.length ? f2(drift.reduce((s, d) => s + Math.abs(d), 0) / drift.length) : '-';
    const compromised = r.compromises === undefined ? '' : `${((100 * r.compromises) / Math.max(1, r.notes ?? 1)).toFixed(1)} %`;
    process.stdout.write([r.label.padEnd(15), ...cells, f2(r.purity.all.meanAbs).padStart(7), maxDrift.padStart(11), meanDrift.padStart(12), compromised.padStart(12), String(r.moved ?? '').padStart(6)].join('') + '\n');
  }
  process.stdout.write(`just-adaptive worst tonic drift: ${worst.name} ${f2(worst.drift)} cents\n`);
  process.stdout.write(`just-adaptive cost per note (chordOn time / notes): p50 ${f2(percentile(cost, 0.5))} µs, p99 ${f2(percentile(cost, 0.99))} µs\n`);
  process.stdout.write(`  the whole engine per note (mts-note, process + flush / notes): p50 ${f2(percentile(engineCost, 0.5))} µs, p99 ${f2(percentile(engineCost, 0.99))} µs\n`);
}

/**
 * Mean |deviation from pure| in cents (and how many intervals) of every fifth/fourth, third and
 * sixth that sounds together (distinct pitches, counted as they form); the drift of the tonic
 * (the piece's final bass, or its opening bass after a half cadence) from its first to its last
 * onset in the bass, worst and mean over the pieces; notes at a compromise pitch; notes moved
 * while sounding.
 */
export function benchAdaptive(): void {
  heading('adaptive just intonation: mean |cents from pure| of the fifths, thirds and sixths that sound (count); tonic drift, end against start');
  const table = loadTuningPreset('just-adaptive').tuning;
  const fixed = [
    ['just-major', loadTuningPreset('just-major').tuning],
    ['meantone-1-4', loadTuningPreset('meantone-1-4').tuning],
  ] as const;
  const corpus = (name: 'schuetz' | 'corelli'): Pieces => ({ label: `corpus/${name}`, pieces: loadCorpus(corpusDir(name)).map((m) => ({ name: m.name, notes: writtenNotes(m) })) });
  const own = (label: string, notes: WrittenNote[]): Pieces => ({ label, pieces: [{ name: label, notes }] });
  const groups = [
    corpus('schuetz'),
    corpus('corelli'),
    own('own: comma pump I-vi-ii-V ×8, detached', commaPump(8, false)),
    own('own: comma pump ×8, common tones held (one phrase)', commaPump(8, true)),
    own('own: chorale phrase in C', OWN_CHORALE),
  ];
  for (const group of groups) printGroup(group, table, fixed);
}
