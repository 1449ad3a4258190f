import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { CLEAN, perform } from '../../bench/score-performance.js';
import { FLAWED, followPerformance, JUMPY, SCORES_DIR } from '../../bench/score.js';
import { formatSpelledPitch, samePitch } from '../../src/pitch/index.js';
import { readMidiFile } from '../../src/render/smf.js';
import { readScoreFile } from '../../src/presets/score-file.js';
import type { Score } from '../../src/score/score.js';
import { ScoreSpeller, type NoteMatch } from '../../src/score/score-speller.js';
import { unfoldMeasures } from '../../src/score/structure.js';
import { parseWrittenSpellings, scoreSpelling, spellEvents } from '../../bench/accuracy.js';
import { FollowSpeller } from '../../src/spelling/follow.js';
import { WindowSpeller } from '../../src/spelling/speller.js';
import { createStrategy } from '../../src/spelling/strategy.js';

// Outside truth: corpus/mozart holds the onsets of 69 Mozart sonata movements as played
// (NAME.mid) with every note's written spelling (NAME.csv), and corpus/mozart-scores the same
// movements as MusicXML; both derived from Craig Stuart Sapp's digital edition of the Alte
// Mozart-Ausgabe, CC BY-NC-SA 4.0 (see corpus/mozart/LICENSE.md and corpus/mozart-scores/LICENSE.md,
// which notes that a few grace and ornament notes are missing from some scores).
const MOZART = join(import.meta.dirname, '..', '..', 'corpus', 'mozart');
const FIXTURES = join(import.meta.dirname, '..', 'fixtures', 'score');
const ascii = { accidentals: 'ascii' } as const;
const load = (name: string): Score => readScoreFile(join(SCORES_DIR, `${name}.mxl`));

function corpusAccuracy(name: string, withScore: boolean): { notes: number; correct: number; speller: ScoreSpeller | undefined } {
  const midi = readMidiFile(readFileSync(join(MOZART, `${name}.mid`)), name);
  const speller = withScore ? new ScoreSpeller(load(name), createStrategy({ strategy: 'follow' })) : undefined;
  const result = scoreSpelling(spellEvents(midi.events, speller ?? new FollowSpeller()), parseWrittenSpellings(readFileSync(join(MOZART, `${name}.csv`), 'utf8')));
  return { notes: result.notes, correct: result.correct, speller };
}

/** Plays notes one at a time, as live with no chord gathering. */
function play(speller: ScoreSpeller, notes: ReadonlyArray<{ key: number; time: number }>): NoteMatch[] {
  return notes.flatMap((n) => {
    speller.spell([{ key: n.key, velocity: 64, time: n.time, channel: 0, source: 0 }]);
    return [...speller.lastMatches()];
  });
}

/** The written notes of measures (by index), one group after another, 250 ms apart, chords spread by 10 ms. */
function writtenNotes(score: Score, measures: readonly number[], start = 0): Array<{ key: number; time: number; written: string }> {
  const out: Array<{ key: number; time: number; written: string }> = [];
  let time = start;
  for (const m of measures) {
    const measure = score.measures[m]!;
    for (let g = measure.firstGroup; g < measure.endGroup; g++) {
      score.groups[g]!.keys.forEach((key, i) => out.push({ key, time: time + 10 * i, written: formatSpelledPitch(score.groups[g]!.notes.find((n) => n.key === key)!.pitch, ascii) }));
      time += 250;
    }
  }
  return out;
}

describe('following the corpus performances (spellings checked against the written ones in corpus/mozart)', () => {
  for (const name of ['sonata01-1', 'sonata06-3l', 'sonata12-2']) {
    it(`${name}: at least 99.9 % as written, above the follow strategy alone`, () => {
      const withScore = corpusAccuracy(name, true);
      const alone = corpusAccuracy(name, false);
      expect(withScore.notes).toBeGreaterThan(800);
      expect(withScore.correct / withScore.notes).toBeGreaterThanOrEqual(0.999);
      expect(withScore.correct).toBeGreaterThan(alone.correct);
      expect(withScore.speller!.counts.fallback).toBe(0);
    });
  }

  it('sonata08-1, whose score lacks three measures and writes as held notes figures the performance plays out: still 99 %', () => {
    const { notes, correct, speller } = corpusAccuracy('sonata08-1', true);
    expect(correct / notes).toBeGreaterThanOrEqual(0.99);
    expect(speller!.counts.ornament).toBeGreaterThan(0.05 * notes); // the notes the score does not have
    expect(speller!.counts.score + speller!.counts.ornament).toBeGreaterThan(0.9 * notes); // it keeps or finds its place
  });
});

describe('following made performances (bench/score-performance.ts)', () => {
  it('clean, with tempo curve, rubato, jitter and spread chords: every written note as written', () => {
    const score = load('sonata04-2');
    const figures = followPerformance(score, perform(score, { ...CLEAN, spreadMs: 60 }));
    expect(figures.written).toBeGreaterThan(1000);
    expect(figures.correct / figures.written).toBeGreaterThanOrEqual(0.9995);
  });

  it('with wrong, extra and dropped notes and unwritten ornaments: at least 99.8 % of the written notes', () => {
    for (const name of ['sonata02-2', 'sonata15-3']) {
      const score = load(name);
      const notes = perform(score, FLAWED);
      expect(notes.filter((n) => n.written === undefined).length).toBeGreaterThan(0.02 * notes.length);
      const figures = followPerformance(score, notes);
      expect(figures.correct / figures.written).toBeGreaterThanOrEqual(0.998);
    }
  });

  it('loose playing: hands up to 150 ms apart, strong rubato at a fast tempo, 5 % of the notes left out', () => {
    const score = load('sonata16-2');
    const figures = followPerformance(score, perform(score, { ...FLAWED, handsApartMs: 150, msPerQuarter: 300, rubato: 0.2, tempoCurve: 0.3, dropped: 0.05 }));
    expect(figures.correct / figures.written).toBeGreaterThanOrEqual(0.998);
  });

  it('re-locates after restarts at other bars and follows the repeats taken', () => {
    const score = load('sonata04-2');
    const notes = perform(score, JUMPY);
    const figures = followPerformance(score, notes);
    const restarts = figures.relocations.filter((r) => r.kind === 'restart');
    expect(restarts).toHaveLength(2);
    for (const r of restarts) expect(r.notes).toBeLessThanOrEqual(30);
    expect(figures.correct / figures.written).toBeGreaterThanOrEqual(0.995);
  });
});

describe('the follower on a short passage', () => {
  const score = load('sonata01-1');

  it('reports the bar of each note, and follows a jump to bar 40 within a few notes', () => {
    const speller = new ScoreSpeller(score, new WindowSpeller());
    const first = writtenNotes(score, [0, 1, 2, 3]);
    const records = play(speller, first);
    expect(records.every((r) => r.match === 'score')).toBe(true);
    expect(records.map((r) => formatSpelledPitch(r.pitch, ascii))).toEqual(first.map((n) => n.written));
    expect(new Set(records.map((r) => r.bar))).toEqual(new Set(['1', '2', '3', '4']));
    const bar40 = score.measures.findIndex((m) => m.number === '40');
    const later = writtenNotes(score, [bar40, bar40 + 1, bar40 + 2], 20_000);
    const after = play(speller, later);
    const found = after.findIndex((r) => r.match === 'score' && r.bar === '40');
    expect(found).toBeGreaterThanOrEqual(0);
    expect(found).toBeLessThanOrEqual(8);
    expect(after.slice(found + 4).every((r) => r.match === 'score')).toBe(true);
    expect(after.at(-1)!.bar).toBe('42');
  });

  it('declares itself lost when the player plays something else, lets the fallback spell, and finds its place again', () => {
    const fallback = new WindowSpeller();
    const speller = new ScoreSpeller(score, fallback);
    play(speller, writtenNotes(score, [0, 1, 2]));
    // something else: a chromatic figure the movement does not have, 40 notes
    const other = Array.from({ length: 40 }, (_, i) => ({ key: 61 + ((i * 5) % 11), time: 10_000 + 120 * i }));
    const lost = play(speller, other);
    const tail = lost.slice(16); // eight notes that fit nowhere near, after the last chance match
    expect(tail.every((r) => r.match === 'fallback' && r.bar === null)).toBe(true);
    for (const r of tail) expect(samePitch(r.pitch, fallback.peek({ key: r.key, velocity: 64, time: 0, channel: 0, source: 0 }))).toBe(true);
    expect(speller.follower.following).toBe(false);
    const back = play(speller, writtenNotes(score, [20, 21, 22], 30_000));
    const found = back.findIndex((r) => r.match === 'score');
    expect(found).toBeLessThanOrEqual(6);
    expect(speller.follower.following).toBe(true);
    expect(back.at(-1)!.bar).toBe(score.measures[22]!.number);
  });

  it('score-bar N and score-restart tell it where the player is', () => {
    const speller = new ScoreSpeller(score, new WindowSpeller());
    play(speller, writtenNotes(score, [0, 1]));
    expect(speller.goToBar(60)).toBe(true);
    expect(speller.goToBar('no such bar')).toBe(false);
    const bar60 = score.measures.findIndex((m) => m.number === '60');
    const at60 = play(speller, writtenNotes(score, [bar60], 5000));
    expect(at60[0]!.match).toBe('score');
    expect(at60[0]!.bar).toBe('60');
    speller.restart();
    const again = play(speller, writtenNotes(score, [0], 9000));
    expect(again.every((r) => r.match === 'score' && r.bar === '1')).toBe(true);
  });

  it('spells an unwritten trill from the score: the upper note as the key signature and the measure have it', () => {
    const speller = new ScoreSpeller(score, new WindowSpeller({ kind: 'window', lowest: -9, highest: 2 })); // a fallback that would say flats
    const notes = writtenNotes(score, [0, 1]);
    // a trill on the first note of measure 2, from above, in C major: the upper note of any white key is white
    const at = notes.findIndex((n, i) => i > 0 && score.groups.find((g) => g.measure === 1)!.keys.includes(n.key) && n.time >= 250 * score.measures[1]!.firstGroup);
    const main = notes[at]!;
    const upper = main.key + ([4, 11].includes(main.key % 12) ? 1 : 2);
    const trill = [upper, main.key, upper, main.key].map((key, i) => ({ key, time: main.time - 200 + 40 * i }));
    const records = play(speller, [...notes.slice(0, at), ...trill, ...notes.slice(at)]);
    const ornaments = records.filter((r) => r.match === 'ornament');
    expect(ornaments.length).toBeGreaterThanOrEqual(2);
    for (const r of ornaments) expect(formatSpelledPitch(r.pitch, ascii)).toMatch(/^[A-G]\d$/u); // C major here: no accidental
    expect(records.filter((r) => r.match === 'score').length).toBeGreaterThanOrEqual(notes.length - 2);
  });

  it('matches a spread chord played in any order', () => {
    const speller = new ScoreSpeller(score, new WindowSpeller());
    const notes = writtenNotes(score, [0, 1, 2]);
    const chord = score.groups[0]!.keys.length;
    expect(chord).toBeGreaterThan(2);
    const reversed = [...notes.slice(0, chord).reverse().map((n, i) => ({ ...n, time: n.time + 25 * i })), ...notes.slice(chord)];
    expect(play(speller, reversed).every((r) => r.match === 'score')).toBe(true);
  });

  it('keeps a held note’s spelling for peek, forgets it at note-off, and hands window and key to the fallback', () => {
    const fallback = new WindowSpeller();
    const speller = new ScoreSpeller(score, fallback);
    const note = { key: score.groups[0]!.keys[0]!, velocity: 64, time: 0, channel: 0, source: 0 };
    const [pitch] = speller.spell([note]);
    expect(speller.peek(note)).toEqual(pitch);
    speller.noteOff(note);
    expect(speller.currentWindow()).toEqual(fallback.currentWindow());
    speller.setKey({ tonic: { fifths: -1 }, mode: 'major' });
    expect(fallback.currentTonic()).toEqual({ fifths: -1 });
  });
});

describe('repeats taken or not (fixture: a repeat with two endings, a segno, a fine and a dal segno)', () => {
  const score = readScoreFile(join(FIXTURES, 'repeats.musicxml'));
  const played = (measures: readonly number[]): NoteMatch[] => play(new ScoreSpeller(score, new WindowSpeller()), writtenNotes(score, measures));

  it('follows the written order with every repeat and the dal segno', () => {
    const order = unfoldMeasures(score);
    const records = played(order);
    expect(records.every((r) => r.match === 'score')).toBe(true);
    expect(records.map((r) => r.bar)).toEqual(order.flatMap((m) => [score.measures[m]!.number, score.measures[m]!.number]));
  });

  it('follows a player who skips the repeat (straight to the second ending)', () => {
    const records = played([0, 1, 3, 4, 5]);
    expect(records.every((r) => r.match === 'score')).toBe(true);
    expect(records.map((r) => r.bar)).toEqual(['1', '1', '2', '2', '4', '4', '5', '5', '6', '6']);
  });
});

describe('grace notes and unprinted ornament notes may be played or left out (fixture: features)', () => {
  const score = readScoreFile(join(FIXTURES, 'features.musicxml'));
  const keysOf = (groups: readonly number[]): Array<{ key: number; time: number }> =>
    groups.flatMap((g, i) => score.groups[g]!.keys.map((key, j) => ({ key, time: 300 * i + 5 * j })));

  it('played as written: every note matched, with its written spelling', () => {
    const records = play(new ScoreSpeller(score, new WindowSpeller()), keysOf([0, 1, 2, 3, 4, 5, 6, 7, 8]));
    expect(records.every((r) => r.match === 'score')).toBe(true);
    expect(records.map((r) => formatSpelledPitch(r.pitch, ascii))).toEqual(['G2', 'G4', 'B4', 'A4', 'F5', 'F5', 'D3', 'D5', 'E4', 'A4', 'G4', 'Bb4']);
  });

  it('left out: the grace note and the unprinted notes cost nothing, the rest is matched', () => {
    const records = play(new ScoreSpeller(score, new WindowSpeller()), keysOf([0, 2, 3, 4, 5, 8]));
    expect(records.every((r) => r.match === 'score')).toBe(true);
    expect(records.at(-1)!.bar).toBe('2');
  });

  it('played otherwise: a different ornament in their place is spelled from the score', () => {
    // instead of the written-out A4 G4, a turn B-flat4 A4 G4 A4: B-flat from the F major key signature of measure 2
    const turn = [70, 69, 67, 69].map((key, i) => ({ key, time: 1500 + 60 * i }));
    const records = play(new ScoreSpeller(score, new WindowSpeller()), [...keysOf([0, 1, 2, 3, 4, 5]), ...turn, { key: 70, time: 1900 }]);
    expect(records.slice(-5).map((r) => formatSpelledPitch(r.pitch, ascii))).toEqual(['Bb4', 'A4', 'G4', 'A4', 'Bb4']);
    expect(records.at(-1)!.match).toBe('score');
  });
});

describe('score-bar N when the score repeats a measure number', () => {
  it('goes to the one ahead of the player, else the first', async () => {
    const { readMusicXml } = await import('../../src/score/musicxml.js');
    const note = (step: string): string => `<note><pitch><step>${step}</step><octave>4</octave></pitch><duration>1</duration></note>`;
    const measures = [['0', 'C'], ['1', 'D'], ['0', 'E'], ['1', 'F']].map(([n, step], i) => `<measure number="${n}">${i === 0 ? '<attributes><divisions>1</divisions></attributes>' : ''}${note(step!)}${note(step!)}</measure>`);
    const score = readMusicXml(new TextEncoder().encode(`<score-partwise><part-list/><part id="P1">${measures.join('')}</part></score-partwise>`), 'bars.musicxml');
    const speller = new ScoreSpeller(score, new WindowSpeller());
    expect(speller.goToBar(0)).toBe(true);
    expect(play(speller, [{ key: 60, time: 0 }])[0]!.match).toBe('score'); // C4, in the first "0"
    play(speller, [{ key: 60, time: 100 }, { key: 62, time: 200 }]);
    expect(speller.goToBar('0')).toBe(true);
    const [e] = play(speller, [{ key: 64, time: 300 }]); // E4: the second "0", ahead
    expect([e!.match, e!.bar]).toEqual(['score', '0']);
    expect(speller.follower.group).toBe(4);
  });
});
