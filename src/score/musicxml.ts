import { keyOf, letterOf, pitchClass, pitchClassOf, spelledPitch, type Letter, type SpelledPitch } from '../pitch/index.js';
import { UserError } from '../util/errors.js';
import type { Jump, MeasureMarks, OnsetGroup, Score, ScoreMeasure, ScoreNote } from './score.js';
import { jumpsOf } from './structure.js';
import { child, childrenNamed, childText, isZip, parseXml, unzipMusicXml, type XmlElement } from './xml-tree.js';

/**
 * Reads a MusicXML score (`.musicxml`/`.xml` text, or a compressed `.mxl`, recognised by its zip
 * signature) into onset groups, measures and jumps. Follows the MusicXML 4.0 partwise format:
 * a note's onset is the part's cursor (moved by `<duration>`, `<backup>`, `<forward>`), `<chord/>`
 * shares the previous note's onset, `<grace/>` takes no time, `<tie type="stop"/>` continues a
 * sound rather than starting one, `<cue/>` notes are not played. Every problem is one line naming
 * the file, the part and the measure.
 */
export function readMusicXml(bytes: Uint8Array, file: string): Score {
  const text = isZip(bytes) ? unzipMusicXml(bytes, file) : new TextDecoder().decode(bytes);
  return scoreFromXml(parseXml(text, file), file);
}

interface RawNote extends ScoreNote {
  /** Quarter notes from the score's start. */
  readonly time: number;
  /** 0 for a main note; −n … −1 for the n grace notes leading to it (−1 is the last). */
  readonly graceOrder: number;
  readonly measure: number;
  readonly keyFifths: number;
}

interface MeasureReading {
  number: string;
  length: number;
  marks: Partial<Mutable<MeasureMarks & { endingStart: boolean; endingStop: boolean }>>;
  keyFifths: number | undefined;
}

type Mutable<T> = { -readonly [K in keyof T]: T[K] };

const STEPS = new Set(['A', 'B', 'C', 'D', 'E', 'F', 'G']);

export function scoreFromXml(root: XmlElement, file: string): Score {
  if (root.name === 'score-timewise') throw new UserError(`${file}: a timewise MusicXML score; export it as partwise MusicXML (what notation programs write by default)`);
  if (root.name !== 'score-partwise') throw new UserError(`${file}: not a MusicXML score (the root element is <${root.name}>, expected <score-partwise>)`);
  const parts = childrenNamed(root, 'part');
  if (parts.length === 0) throw new UserError(`${file}: the score has no <part>`);
  const title = childText(child(root, 'work') ?? root, 'work-title') ?? childText(root, 'movement-title') ?? '';
  const readings: MeasureReading[] = [];
  const notes: RawNote[] = [];
  parts.forEach((part, partIndex) => readPart(part, partIndex, file, readings, notes));
  // measure starts: each measure is as long as its longest part
  const starts: number[] = [];
  let at = 0;
  for (const r of readings) {
    starts.push(at);
    at += r.length;
  }
  const positioned = notes.map((n) => ({ ...n, time: (starts[n.measure] ?? 0) + n.time }));
  return assemble(title, readings, starts, positioned);
}

function readPart(part: XmlElement, partIndex: number, file: string, readings: MeasureReading[], out: RawNote[]): void {
  const partName = part.attributes.id ?? String(partIndex + 1);
  let divisions = 0;
  let keyFifths = 0;
  let transpose = { diatonic: 0, chromatic: 0 };
  const measures = childrenNamed(part, 'measure');
  measures.forEach((measure, measureIndex) => {
    const number = measure.attributes.number ?? String(measureIndex + 1);
    const where = `${file}: part ${partName}, measure ${number}`;
    const reading = (readings[measureIndex] ??= { number, length: 0, marks: {}, keyFifths: undefined });
    let cursor = 0;
    let furthest = 0;
    let lastOnset = 0;
    let pendingGraces: Array<Omit<RawNote, 'graceOrder' | 'time'> & { voiceKey: string; chordWithPrevious: boolean }> = [];
    const flushGraces = (voiceKey: string, time: number): void => {
      const mine = pendingGraces.filter((g) => g.voiceKey === voiceKey);
      if (mine.length === 0) return;
      pendingGraces = pendingGraces.filter((g) => g.voiceKey !== voiceKey);
      // a chord of graces shares one order
      let order = 0;
      const orders: number[] = [];
      for (let i = mine.length - 1; i >= 0; i--) {
        orders[i] = order - 1;
        if (!mine[i]!.chordWithPrevious) order--;
      }
      mine.forEach((g, i) => {
        const { voiceKey: _v, chordWithPrevious: _c, ...note } = g;
        out.push({ ...note, time, graceOrder: orders[i]! });
      });
    };
    const duration = (element: XmlElement, what: string): number => {
      const text = childText(element, 'duration');
      const value = Number(text);
      if (text === undefined || !Number.isFinite(value) || value < 0) throw new UserError(`${where}: <${what}> has no valid <duration>`);
      if (divisions <= 0) throw new UserError(`${where}: a duration comes before <divisions> is set`);
      return value / divisions;
    };
    for (const element of measure.children) {
      switch (element.name) {
        case 'attributes': {
          const d = childText(element, 'divisions');
          if (d !== undefined) {
            divisions = Number(d);
            if (!(divisions > 0)) throw new UserError(`${where}: <divisions> must be a positive number, not "${d}"`);
          }
          const key = child(element, 'key');
          const fifths = key && childText(key, 'fifths');
          if (fifths !== undefined) {
            keyFifths = Number(fifths);
            if (!Number.isInteger(keyFifths) || Math.abs(keyFifths) > 11) throw new UserError(`${where}: <key><fifths> must be a whole number of sharps or flats, not "${fifths}"`);
            if (cursor === 0 && partIndex === 0) reading.keyFifths = keyFifths;
          }
          const t = child(element, 'transpose');
          if (t) transpose = { diatonic: Number(childText(t, 'diatonic') ?? 0) + 7 * Number(childText(t, 'octave-change') ?? 0), chromatic: Number(childText(t, 'chromatic') ?? 0) + 12 * Number(childText(t, 'octave-change') ?? 0) };
          break;
        }
        case 'backup':
          cursor -= duration(element, 'backup');
          if (cursor < -1e-9) throw new UserError(`${where}: <backup> goes back before the measure's start`);
          break;
        case 'forward':
          cursor += duration(element, 'forward');
          furthest = Math.max(furthest, cursor);
          break;
        case 'barline':
          readBarline(element, reading, where);
          break;
        case 'direction':
        case 'sound':
          readJumpMarks(element, reading);
          break;
        case 'note': {
          const grace = child(element, 'grace') !== undefined;
          const chord = child(element, 'chord') !== undefined;
          const voiceKey = `${childText(element, 'staff') ?? '1'}/${childText(element, 'voice') ?? '1'}`;
          const onset = chord ? lastOnset : cursor;
          if (!grace && !chord) {
            const d = duration(element, 'note');
            lastOnset = cursor;
            cursor += d;
            furthest = Math.max(furthest, cursor);
          }
          const pitchElement = child(element, 'pitch');
          if (!grace) flushGraces(voiceKey, onset);
          if (!pitchElement || child(element, 'cue')) break;
          const tieStop = childrenNamed(element, 'tie').some((t) => t.attributes.type === 'stop');
          if (tieStop) break;
          const pitch = soundingPitch(readPitch(pitchElement, where), transpose);
          const note = {
            key: keyOf(pitch),
            pitch,
            auxiliaries: ornamentNotes(element, pitch),
            part: partIndex,
            staff: Number(childText(element, 'staff') ?? 1),
            voice: childText(element, 'voice') ?? '1',
            grace,
            hidden: element.attributes['print-object'] === 'no',
            measure: measureIndex,
            keyFifths,
          };
          if (note.key < 0 || note.key > 127) throw new UserError(`${where}: the note ${pitch.octave} octave lies outside the MIDI keys`);
          if (grace) pendingGraces.push({ ...note, voiceKey, chordWithPrevious: chord });
          else out.push({ ...note, time: onset, graceOrder: 0 });
          break;
        }
        default:
          break;
      }
    }
    // graces left at the end of a measure lead into the next onset: place them at the measure's end
    for (const key of new Set(pendingGraces.map((g) => g.voiceKey))) flushGraces(key, furthest);
    const implicitLength = furthest;
    reading.length = Math.max(reading.length, implicitLength);
  });
}

function readPitch(pitch: XmlElement, where: string): SpelledPitch {
  const step = childText(pitch, 'step');
  const alterText = childText(pitch, 'alter') ?? '0';
  const octaveText = childText(pitch, 'octave');
  if (step === undefined || !STEPS.has(step)) throw new UserError(`${where}: a <pitch> has no valid <step> (A–G), found "${step ?? ''}"`);
  const alter = Number(alterText);
  if (!Number.isFinite(alter)) throw new UserError(`${where}: <alter> "${alterText}" is not a number`);
  if (!Number.isInteger(alter)) throw new UserError(`${where}: <alter>${alterText}</alter> is a microtonal alteration; only whole semitones are spelled`);
  if (Math.abs(alter) > 3) throw new UserError(`${where}: <alter>${alterText}</alter> has more than three sharps or flats`);
  const octave = Number(octaveText);
  if (octaveText === undefined || !Number.isInteger(octave)) throw new UserError(`${where}: a <pitch> has no valid <octave>`);
  return spelledPitch(pitchClassOf(step as Letter, alter), octave);
}

/** Sounding pitch of a transposing part: the written pitch moved by `<transpose>` (diatonic steps, semitones). */
function soundingPitch(written: SpelledPitch, t: { diatonic: number; chromatic: number }): SpelledPitch {
  if (t.diatonic === 0 && t.chromatic === 0) return written;
  // an interval of d steps and c semitones lies 2d − 7·(octaves)… on the line of fifths: solve via the natural interval
  const NATURAL_SEMITONES = [0, 2, 4, 5, 7, 9, 11];
  const NATURAL_FIFTHS = [0, 2, 4, -1, 1, 3, 5];
  const steps = ((t.diatonic % 7) + 7) % 7;
  const octaves = Math.floor(t.diatonic / 7);
  const alteration = t.chromatic - 12 * octaves - NATURAL_SEMITONES[steps]!;
  const fifths = written.fifths + NATURAL_FIFTHS[steps]! + 7 * alteration;
  const key = keyOf(written) + t.chromatic;
  const base = spelledPitch(pitchClass(fifths), 0);
  return spelledPitch(pitchClass(fifths), (key - keyOf(base)) / 12);
}

const ACCIDENTAL_MARKS: Readonly<Record<string, number>> = { sharp: 1, natural: 0, flat: -1, 'double-sharp': 2, 'sharp-sharp': 2, 'flat-flat': -2 };
const UPPER = new Set(['trill-mark', 'inverted-mordent', 'shake']);
const LOWER = new Set(['mordent']);
const BOTH = new Set(['turn', 'inverted-turn', 'delayed-turn', 'delayed-inverted-turn', 'vertical-turn']);

/**
 * The auxiliary notes of a written ornament whose accidental the score marks (`<accidental-mark>`
 * in `<ornaments>`, MusicXML 4.0): a trill's or inverted mordent's upper note, a mordent's lower
 * note, a turn's upper (mark above) or lower (mark below) note. Unmarked auxiliaries follow the
 * key signature and the accidentals in force, which `impliedSpelling` already reads.
 */
function ornamentNotes(note: XmlElement, main: SpelledPitch): SpelledPitch[] {
  const out: SpelledPitch[] = [];
  for (const notations of childrenNamed(note, 'notations')) {
    for (const ornaments of childrenNamed(notations, 'ornaments')) {
      const kinds = ornaments.children.map((c) => c.name);
      const upper = kinds.some((k) => UPPER.has(k) || BOTH.has(k));
      const lower = kinds.some((k) => LOWER.has(k) || BOTH.has(k));
      for (const mark of childrenNamed(ornaments, 'accidental-mark')) {
        const alteration = ACCIDENTAL_MARKS[mark.text];
        if (alteration === undefined) continue;
        const placement = mark.attributes.placement;
        const direction = upper && lower ? (placement === 'below' ? -1 : 1) : upper ? 1 : lower ? -1 : 0;
        if (direction !== 0) out.push(neighbour(main, direction, alteration));
      }
    }
  }
  return out;
}

/** The note a step above (+1) or below (−1) a written note, with the given alteration. */
function neighbour(main: SpelledPitch, direction: number, alteration: number): SpelledPitch {
  const order: Letter[] = ['C', 'D', 'E', 'F', 'G', 'A', 'B'];
  const index = order.indexOf(letterOf(main)) + direction;
  const letter = order[(index + 7) % 7]!;
  const octave = main.octave + (index < 0 ? -1 : index > 6 ? 1 : 0);
  return spelledPitch(pitchClassOf(letter, alteration), octave);
}

function endingNumbers(text: string | undefined): number[] {
  return (text ?? '')
    .split(/[,\s]+/u)
    .map(Number)
    .filter((n) => Number.isInteger(n) && n > 0);
}

function readBarline(barline: XmlElement, reading: MeasureReading, where: string): void {
  const repeat = child(barline, 'repeat');
  if (repeat?.attributes.direction === 'forward') reading.marks.repeatStart = true;
  if (repeat?.attributes.direction === 'backward') {
    const times = Number(repeat.attributes.times ?? 2);
    if (!Number.isInteger(times) || times < 1) throw new UserError(`${where}: <repeat times="${repeat.attributes.times}"> must be a whole number`);
    reading.marks.repeatEnd = times;
  }
  const ending = child(barline, 'ending');
  if (ending?.attributes.type === 'start') {
    const numbers = endingNumbers(ending.attributes.number);
    if (numbers.length === 0) throw new UserError(`${where}: <ending number="${ending.attributes.number ?? ''}"> names no ending number`);
    reading.marks.endings = numbers;
    reading.marks.endingStart = true;
  }
  if (ending && (ending.attributes.type === 'stop' || ending.attributes.type === 'discontinue')) reading.marks.endingStop = true;
  if (child(barline, 'segno')) reading.marks.segno ??= 'segno';
  if (child(barline, 'coda')) reading.marks.coda ??= 'coda';
  readJumpMarks(barline, reading);
}

/** `<sound>` jump attributes (MusicXML: dacapo, dalsegno, segno, tocoda, coda, fine), and segno/coda signs. */
function readJumpMarks(element: XmlElement, reading: MeasureReading): void {
  const sound = element.name === 'sound' ? element : child(element, 'sound');
  const a = sound?.attributes ?? {};
  if (a.dacapo === 'yes') reading.marks.daCapo = true;
  if (a.dalsegno !== undefined) reading.marks.dalSegno = a.dalsegno || 'segno';
  if (a.segno !== undefined) reading.marks.segno = a.segno || 'segno';
  if (a.tocoda !== undefined) reading.marks.toCoda = a.tocoda || 'coda';
  if (a.coda !== undefined) reading.marks.coda = a.coda || 'coda';
  if (a.fine !== undefined) reading.marks.fine = true;
  for (const type of childrenNamed(element, 'direction-type')) {
    if (child(type, 'segno')) reading.marks.segno ??= 'segno';
    if (child(type, 'coda') && a.tocoda === undefined) reading.marks.coda ??= 'coda';
  }
}

function assemble(title: string, readings: readonly MeasureReading[], starts: readonly number[], notes: readonly RawNote[]): Score {
  const sorted = [...notes].sort((a, b) => a.time - b.time || a.graceOrder - b.graceOrder || a.key - b.key);
  const groups: OnsetGroup[] = [];
  let i = 0;
  while (i < sorted.length) {
    const first = sorted[i]!;
    const members: RawNote[] = [];
    while (i < sorted.length && Math.abs(sorted[i]!.time - first.time) < 1e-6 && sorted[i]!.graceOrder === first.graceOrder) members.push(sorted[i++]!);
    const keys = [...new Set(members.map((m) => m.key))];
    groups.push({
      index: groups.length,
      measure: Math.min(...members.map((m) => m.measure)),
      time: first.time,
      notes: members.map(({ key, pitch, part, staff, voice, grace, hidden, auxiliaries }) => ({ key, pitch, part, staff, voice, grace, hidden, auxiliaries })),
      keys,
      optional: members.every((m) => m.grace || m.hidden),
      keyFifths: first.keyFifths,
    });
  }
  // endings: an ending runs from its start bracket to its stop (or to the next start)
  let currentEndings: number[] = [];
  let keyFifths = 0;
  let g = 0;
  const measures: ScoreMeasure[] = readings.map((r, index) => {
    if (r.marks.endingStart) currentEndings = [...(r.marks.endings ?? [])];
    const endings = currentEndings;
    if (r.marks.endingStop) currentEndings = [];
    if (r.keyFifths !== undefined) keyFifths = r.keyFifths;
    const firstGroup = g;
    while (g < groups.length && groups[g]!.measure === index) g++;
    return {
      index,
      number: r.number,
      start: starts[index] ?? 0,
      length: r.length,
      firstGroup,
      endGroup: g,
      keyFifths,
      repeatStart: r.marks.repeatStart ?? false,
      repeatEnd: r.marks.repeatEnd ?? 0,
      endings,
      segno: r.marks.segno,
      coda: r.marks.coda,
      daCapo: r.marks.daCapo ?? false,
      dalSegno: r.marks.dalSegno,
      toCoda: r.marks.toCoda,
      fine: r.marks.fine ?? false,
    };
  });
  const jumps: Jump[] = jumpsOf(measures);
  return { title, measures, groups, jumps };
}
