import { describe, expect, it } from 'vitest';
import { corpusDir, loadCorpus } from '../../bench/corpus.js';
import { perform, performedEvents, writtenNotes } from '../../bench/performance.js';
import { formatSpelledPitch, keyOf, parseSpelledPitch } from '../../src/pitch/index.js';
import { spellTake, type TakeEvent } from '../../bench/accuracy.js';
import { FollowSpeller } from '../../src/spelling/follow.js';

// A movement of the open Mozart corpus (corpus/mozart, CC BY-NC-SA 4.0) as the written notes.
const movement = loadCorpus(corpusDir('mozart'))[0]!;
const notes = writtenNotes(movement.midi.events);

describe('the performance generator', () => {
  it('reads every note-on of the file with its note-off', () => {
    const onsets = movement.midi.events.filter((e) => (e.data[0]! & 0xf0) === 0x90 && e.data[2]! > 0).length;
    expect(notes.length).toBe(onsets);
    for (const n of notes) expect(n.end).toBeGreaterThan(n.time);
  });

  it('is deterministic for a seed, and another seed plays differently', () => {
    expect(perform(notes, { seed: 7 })).toEqual(perform(notes, { seed: 7 }));
    expect(perform(notes, { seed: 8 }).notes.map((n) => n.time)).not.toEqual(perform(notes, { seed: 7 }).notes.map((n) => n.time));
  });

  it('accounts for every written note once: played, played wrong, or dropped', () => {
    const p = perform(notes, { seed: 3, wrongNoteRate: 0.05, dropRate: 0.05, ornamentRate: 0.05 });
    const seen = new Map<number, number>();
    for (const n of p.notes) if (n.written !== undefined) seen.set(n.written, (seen.get(n.written) ?? 0) + 1);
    for (const d of p.dropped) seen.set(d, (seen.get(d) ?? 0) + 1);
    expect(seen.size).toBe(notes.length);
    expect([...seen.values()].every((c) => c === 1)).toBe(true);
    expect(p.dropped.length).toBeGreaterThan(0);
    for (const n of p.notes) {
      const w = n.written === undefined ? undefined : notes[n.written]!;
      if (n.kind === 'played') expect(n.key).toBe(w!.key);
      if (n.kind === 'wrong') expect([1, 2]).toContain(Math.abs(n.key - w!.key));
      if (n.kind === 'ornament') expect(w).toBeUndefined();
    }
    expect(p.notes.some((n) => n.kind === 'wrong')).toBe(true);
    expect(p.notes.some((n) => n.kind === 'ornament')).toBe(true);
  });

  it('places an ornament just before the note it decorates, a step or two away', () => {
    const p = perform(notes, { seed: 5, ornamentRate: 0.2, onsetJitterMs: 0, chordSpreadMs: 0, ornamentMs: 60, wrongNoteRate: 0 });
    const ornaments = p.notes.filter((n) => n.kind === 'ornament');
    expect(ornaments.length).toBeGreaterThan(10);
    for (const o of ornaments) {
      const target = p.notes.find((n) => n.kind !== 'ornament' && n.time === o.end && n.channel === o.channel && [1, 2].includes(Math.abs(n.key - o.key)));
      expect(target).toBeDefined();
      expect(o.end - o.time).toBeLessThanOrEqual(60);
    }
  });

  it('spreads a chord over at most the chosen time, and keeps the written order of onsets', () => {
    const p = perform(notes, { seed: 11, onsetJitterMs: 0, chordSpreadMs: 40, wrongNoteRate: 0, dropRate: 0, ornamentRate: 0 });
    const byWritten = new Map<number, number>();
    for (const n of p.notes) byWritten.set(n.written!, n.time);
    const chords = new Map<number, number[]>();
    for (const w of notes) chords.set(w.time, [...(chords.get(w.time) ?? []), byWritten.get(w.index)!]);
    let spread = 0;
    for (const times of chords.values()) spread = Math.max(spread, Math.max(...times) - Math.min(...times));
    expect(spread).toBeLessThanOrEqual(40);
    expect(spread).toBeGreaterThan(20);
    // With no spread, jitter or slips the tempo map alone moves the onsets: their order stays.
    const plain = perform(notes, { seed: 11, onsetJitterMs: 0, chordSpreadMs: 0, wrongNoteRate: 0, dropRate: 0, ornamentRate: 0 });
    const time = new Map(plain.notes.map((n) => [n.written!, n.time]));
    for (let i = 1; i < notes.length; i++) {
      const [a, b] = [notes[i - 1]!, notes[i]!];
      if (b.time > a.time) expect(time.get(b.index)!).toBeGreaterThan(time.get(a.index)!);
    }
    // Rubato and drift really move the time: the performed length differs from the written one.
    const last = notes[notes.length - 1]!;
    expect(Math.abs(time.get(last.index)! - last.time)).toBeGreaterThan(100);
  });

  it('gives note-offs before note-ons at the same time', () => {
    const events = performedEvents(perform(notes, { seed: 2 }));
    for (let i = 1; i < events.length; i++) {
      expect(events[i]!.time).toBeGreaterThanOrEqual(events[i - 1]!.time);
      if (events[i]!.time === events[i - 1]!.time && events[i - 1]!.on) expect(events[i]!.on).toBe(true);
    }
  });
});

describe('spelling a take with gathering', () => {
  /** A chord's notes arriving `stepMs` apart from `start`, as a take's events, with their note-offs at `end`. */
  function spread(names: string[], start: number, stepMs: number, end: number, firstId: number): TakeEvent[] {
    return names.flatMap((name, i) => {
      const key = keyOf(parseSpelledPitch(name));
      return [
        { time: start + i * stepMs, on: true, id: firstId + i, key, channel: 0, velocity: 80 },
        { time: end, on: false, id: firstId + i, key, channel: 0, velocity: 0 },
      ];
    });
  }

  function take(stepMs: number): TakeEvent[] {
    // A minor i – V7 – i, then an F minor chord whose A♭ arrives first: one early note must not decide.
    const chords = [['A3', 'C4', 'E4'], ['E3', 'G#3', 'B3', 'D4'], ['A3', 'C4', 'E4'], ['Ab3', 'F3', 'C4']];
    return chords.flatMap((c, i) => spread(c, i * 600, stepMs, i * 600 + 550, i * 10)).sort((a, b) => a.time - b.time || Number(a.on) - Number(b.on));
  }

  it('spells a chord spread over 30 ms as one chord with --gather 40', () => {
    const spelled = spellTake(take(15), new FollowSpeller(), 40);
    expect([30, 31, 32].map((id) => formatSpelledPitch(spelled.get(id)!))).toEqual(['Ab3', 'F3', 'C4']);
  });

  it('without gathering the early note is spelled alone: G♯, the leading tone of A minor', () => {
    const spelled = spellTake(take(15), new FollowSpeller(), 0);
    expect(formatSpelledPitch(spelled.get(30)!)).toBe('G#3');
    // Struck together and gathered, the chord is F minor again.
    const together = spellTake(take(0), new FollowSpeller(), 40);
    expect([30, 31, 32].map((id) => formatSpelledPitch(together.get(id)!))).toEqual(['Ab3', 'F3', 'C4']);
  });
});
