// Adaptive just intonation on the corpora: purity of what sounds, drift, notes moved, cost per note.
// The measure (src/tuning/adaptive/purity.ts) takes (time, frequency, on/off) events, so the same
// code can later measure the engine's output as the reference synth sounds it.
import { readFileSync } from 'node:fs';
import { performance } from 'node:perf_hooks';
import { parseSpelledPitch, type SpelledPitch } from '../src/pitch/index.js';
import { loadTuningPreset } from '../src/presets/tuning-presets.js';
import { parseWrittenSpellings } from '../src/spelling/accuracy.js';
import { A440, frequency, type Tuning } from '../src/tuning/index.js';
import { AdaptiveTuner, CONSONANCE_FAMILIES, measurePurity, pitchClassDrift, type AdaptiveSettings, type PurityReport, type SoundingEvent } from '../src/tuning/adaptive/index.js';
import { corpusDir, loadCorpus, type Movement } from './corpus.js';
import { heading, percentile } from './timing.js';

/** A note of a piece with its written spelling: on at `on`, off at `off` (milliseconds). */
export interface WrittenNote {
  readonly id: number;
  readonly on: number;
  readonly off: number;
  readonly pitch: SpelledPitch;
}

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
  /** Sounding notes whose pitch, asked again after a later note, differed from the one they were given. */
  readonly movedInTuner: number;
  readonly compromises: number;
}

/** Drives an `AdaptiveTuner` with a piece's written spellings and timing. */
export function runAdaptive(notes: readonly WrittenNote[], table: Tuning, settings: Partial<AdaptiveSettings> = {}): AdaptiveRun {
  const tuner = new AdaptiveTuner({ table, reference: A440, settings });
  const events: SoundingEvent[] = [];
  const costPerNote: number[] = [];
  const given = new Map<number | string, number>();
  let movedInTuner = 0;
  for (const { time, ons, offs } of timeline(notes)) {
    for (const n of offs) {
      tuner.noteOff(time, n.id);
      given.delete(n.id);
      events.push({ kind: 'off', time, id: n.id });
    }
    if (ons.length === 0) continue;
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

/** The piece's final: the lowest note of the last onset. */
export function finalOf(notes: readonly WrittenNote[]): SpelledPitch | undefined {
  const lastOn = Math.max(...notes.map((n) => n.on));
  return notes.filter((n) => n.on === lastOn).sort((a, b) => a.pitch.octave * 12 - b.pitch.octave * 12 + (a.pitch.fifths * 7 - b.pitch.fifths * 7))[0]?.pitch;
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
  const hold = legato ? '~' : '';
  const round = [`C3 G3 E4${hold} C5${hold}`, `A2 A3 E4${hold} C5`, `D3 A3${hold} F4 D5${hold}`, `G2 B3 D4 D5`];
  return progression([...Array.from({ length: rounds }, () => round).flat(), 'C3 G3 E4 C5'].join(' | '));
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
  readonly drift: number[];
}

function rowsFor(group: Pieces, table: Tuning, fixed: ReadonlyArray<readonly [string, Tuning]>, settings: Partial<AdaptiveSettings>) {
  const cost: number[] = [];
  let moved = 0;
  let compromises = 0;
  let notes = 0;
  const adaptive: SoundingEvent[][] = [];
  const drifts: number[] = [];
  const fixedRuns = fixed.map(() => ({ events: [] as SoundingEvent[][], drift: [] as number[] }));
  for (const piece of group.pieces) {
    if (piece.notes.length === 0) continue;
    const final = finalOf(piece.notes);
    const run = runAdaptive(piece.notes, table, settings);
    adaptive.push(run.events);
    cost.push(...run.costPerNote);
    moved += run.movedInTuner;
    compromises += run.compromises;
    notes += piece.notes.length;
    const d = final && pitchClassDrift(run.events, final.fifths);
    if (d !== undefined) drifts.push(d);
    fixed.forEach(([, tuning], i) => {
      const tonal = final ? tuning.withTonic(final) : tuning;
      const events = fixedEvents(piece.notes, tonal);
      fixedRuns[i]!.events.push(events);
      const fd = final && pitchClassDrift(events, final.fifths);
      if (fd !== undefined) fixedRuns[i]!.drift.push(fd);
    });
  }
  const rows: Row[] = [
    { label: 'just-adaptive', purity: measurePurity(adaptive.flat()), drift: drifts },
    ...fixed.map(([label], i) => ({ label, purity: measurePurity(fixedRuns[i]!.events.flat()), drift: fixedRuns[i]!.drift })),
  ];
  cost.sort((a, b) => a - b);
  return { rows, cost, moved, compromises, notes };
}

const f2 = (n: number): string => n.toFixed(2);

function printGroup(group: Pieces, table: Tuning, fixed: ReadonlyArray<readonly [string, Tuning]>, settings: Partial<AdaptiveSettings>): void {
  const { rows, cost, moved, compromises, notes } = rowsFor(group, table, fixed, settings);
  const pieces = group.pieces.filter((p) => p.notes.length > 0).length;
  process.stdout.write(`\n${group.label}: ${pieces} pieces, ${notes} notes\n`);
  const head = ['tuning'.padEnd(16), ...CONSONANCE_FAMILIES.map((f) => f.padStart(24)), 'all'.padStart(8), 'max |drift|'.padStart(12), 'mean |drift|'.padStart(13)];
  process.stdout.write(head.join('') + '\n');
  for (const r of rows) {
    const cells = CONSONANCE_FAMILIES.map((f) => `${f2(r.purity.byFamily[f].meanAbs)} (${r.purity.byFamily[f].count})`.padStart(24));
    const maxDrift = r.drift.length ? Math.max(...r.drift.map(Math.abs)) : NaN;
    const meanDrift = r.drift.length ? r.drift.reduce((s, d) => s + Math.abs(d), 0) / r.drift.length : NaN;
    process.stdout.write([r.label.padEnd(16), ...cells, f2(r.purity.all.meanAbs).padStart(8), f2(maxDrift).padStart(12), f2(meanDrift).padStart(13)].join('') + '\n');
  }
  process.stdout.write(
    `just-adaptive: notes moved while sounding ${moved} (tuner) / ${rows[0]!.purity.moved} (events); compromises ${compromises} (${((100 * compromises) / Math.max(1, notes)).toFixed(1)} %); ` +
      `cost per note p50 ${f2(percentile(cost, 0.5))} µs, p99 ${f2(percentile(cost, 0.99))} µs\n`,
  );
}

/** Mean |deviation from pure| (cents, and how many intervals) of every fifth/fourth, third and sixth that sounds; drift of the final. */
export function benchAdaptive(settings: Partial<AdaptiveSettings> = {}): void {
  heading('adaptive just intonation: mean |cents from pure| of sounding intervals (count), |drift| of the final, end against start');
  const table = loadTuningPreset('just-adaptive').tuning;
  const fixed = [
    ['just-major', loadTuningPreset('just-major').tuning],
    ['meantone-1-4', loadTuningPreset('meantone-1-4').tuning],
  ] as const;
  const corpus = (name: 'schuetz' | 'corelli'): Pieces => ({ label: `corpus/${name}`, pieces: loadCorpus(corpusDir(name)).map((m) => ({ name: m.name, notes: writtenNotes(m) })) });
  const own: Pieces = {
    label: 'own pieces (comma pump ×8 detached and legato, a chorale phrase)',
    pieces: [
      { name: 'pump', notes: commaPump(8, false) },
      { name: 'pump-legato', notes: commaPump(8, true) },
      { name: 'chorale', notes: OWN_CHORALE },
    ],
  };
  for (const group of [corpus('schuetz'), corpus('corelli'), own]) printGroup(group, table, fixed, settings);
}
