import { formatSpelledPitch, type SpelledPitch } from '../pitch/index.js';
import type { FileEvent } from '../render/smf.js';
import type { NoteContext, Speller } from './speller.js';

/** A spelled note-on of a file, in file order. */
export interface SpelledOnset {
  readonly tick: number;
  readonly time: number;
  readonly key: number;
  readonly channel: number;
  readonly pitch: SpelledPitch;
}

/**
 * Spells a file's note-ons with a speller, as the live path would (note-offs included), taking
 * note-ons with the same time as one chord.
 */
export function spellEvents(events: readonly FileEvent[], speller: Speller): SpelledOnset[] {
  const out: SpelledOnset[] = [];
  let group: Array<{ event: FileEvent; note: NoteContext }> = [];
  const flush = (): void => {
    if (group.length === 0) return;
    const pitches = speller.spell(group.map((g) => g.note));
    group.forEach((g, i) => out.push({ tick: g.event.tick, time: g.event.time, key: g.note.key, channel: g.note.channel, pitch: pitches[i]! }));
    group = [];
  };
  for (const event of events) {
    const [status = 0, key = 0, velocity = 0] = event.data;
    const kind = status & 0xf0;
    if (kind !== 0x90 && kind !== 0x80) continue;
    if (group.length > 0 && group[0]!.event.time !== event.time) flush();
    const note: NoteContext = { key, velocity, time: event.time, channel: status & 0x0f, source: 0 };
    if (kind === 0x90 && velocity > 0) group.push({ event, note });
    else {
      flush();
      speller.noteOff(note);
    }
  }
  flush();
  return out;
}

/** Written spellings from a `tick,key,spelling` CSV (a header row first). */
export function parseWrittenSpellings(csv: string): Array<{ tick: number; key: number; spelling: string }> {
  return csv
    .split('\n')
    .slice(1)
    .filter((line) => line.trim() !== '')
    .map((line) => {
      const [tick = '', key = '', spelling = ''] = line.split(',');
      return { tick: Number(tick), key: Number(key), spelling: spelling.trim() };
    });
}

export interface AccuracyResult {
  readonly notes: number;
  readonly correct: number;
  /** Written spelling → what was played instead, for the notes that differ. */
  readonly confusions: ReadonlyMap<string, number>;
}

/** Compares spelled onsets with written ones, matched by tick and key. */
export function scoreSpelling(spelled: readonly SpelledOnset[], written: ReadonlyArray<{ tick: number; key: number; spelling: string }>): AccuracyResult {
  const byOnset = new Map<string, string[]>();
  for (const w of written) {
    const id = `${w.tick}:${w.key}`;
    byOnset.set(id, [...(byOnset.get(id) ?? []), w.spelling]);
  }
  let notes = 0;
  let correct = 0;
  const confusions = new Map<string, number>();
  for (const s of spelled) {
    const list = byOnset.get(`${s.tick}:${s.key}`);
    const expected = list?.shift();
    if (expected === undefined) continue;
    notes++;
    const got = formatSpelledPitch(s.pitch);
    if (got === expected) correct++;
    else {
      const label = `${expected.replace(/-?\d+$/u, '')}→${got.replace(/-?\d+$/u, '')}`;
      confusions.set(label, (confusions.get(label) ?? 0) + 1);
    }
  }
  return { notes, correct, confusions };
}
