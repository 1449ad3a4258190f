import { formatSpelledPitch, type SpelledPitch } from '../src/pitch/index.js';
import type { FileEvent } from '../src/render/smf.js';
import type { NoteContext, Speller } from '../src/spelling/speller.js';

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

/** A note-on or note-off of a take, with an id that pairs them. */
export interface TakeEvent {
  readonly time: number;
  readonly on: boolean;
  readonly id: number;
  readonly key: number;
  readonly channel: number;
  readonly velocity: number;
}

/**
 * Spells a take's note-ons as the live path does with `--gather MS`: a chord is the notes that
 * begin within `gatherMs` of its first note, spelled together when the next note falls outside
 * that time or one of them is released (0: each note alone). A key struck again while it sounds ends its
 * earlier note first, as on a keyboard. Returns the spelling of each note-on by id.
 */
export function spellTake(events: readonly TakeEvent[], speller: Speller, gatherMs: number): Map<number, SpelledPitch> {
  const out = new Map<number, SpelledPitch>();
  const sounding = new Map<number, number>(); // channel·128 + key → id of the note sounding there
  let pending: TakeEvent[] = [];
  const context = (e: TakeEvent, time: number): NoteContext => ({ key: e.key, velocity: e.velocity, time, channel: e.channel, source: 0 });
  const flush = (): void => {
    if (pending.length === 0) return;
    const since = pending[0]!.time;
    const pitches = speller.spell(pending.map((e) => context(e, since)));
    pending.forEach((e, i) => out.set(e.id, pitches[i]!));
    pending = [];
  };
  for (const e of events) {
    if (pending.length > 0 && (e.time - pending[0]!.time > gatherMs || (!e.on && pending.some((p) => p.id === e.id)))) flush();
    const place = e.channel * 128 + e.key;
    if (e.on) {
      const earlier = sounding.get(place);
      if (earlier !== undefined) {
        flush();
        speller.noteOff(context(e, e.time));
      }
      sounding.set(place, e.id);
      pending.push(e);
      if (gatherMs === 0) flush();
    } else if (sounding.get(place) === e.id) {
      sounding.delete(place);
      speller.noteOff(context(e, e.time));
    }
  }
  flush();
  return out;
}
