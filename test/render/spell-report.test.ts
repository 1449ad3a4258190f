import { describe, expect, it } from 'vitest';
import { keyOf, parseSpelledPitch, pitchClass } from '../../src/pitch/index.js';
import { loadTuningPreset } from '../../src/presets/tuning-presets.js';
import { SpellReport } from '../../src/render/spell-report.js';
import { noteId } from '../../src/midi/note-id.js';
import type { NoteEvent } from '../../src/router/events.js';
import { DEFAULT_WOLF_LIMITS, frequency, reference } from '../../src/tuning/index.js';
import { parseKey, type DeclaredKey } from '../../src/spelling/keys.js';

const quarterComma = loadTuningPreset('meantone-1-4').tuning;
const a440 = reference(parseSpelledPitch('A4'), 440);

/** A note event as the router reports it, tuned in quarter-comma meantone at A4 = 440. */
function note(spelling: string, time: number): NoteEvent {
  const pitch = parseSpelledPitch(spelling);
  const key = keyOf(pitch);
  return { type: 'note', time, id: noteId(0, 0, key), velocity: 80, pitch, wanted: undefined, hz: frequency(quarterComma, a440, pitch), cents: 0, placement: { channel: 1, key }, adaptive: undefined };
}

describe('the spelling summary', () => {
  it('lists an octave sounded by two spellings of one key class, a lesser diesis out, and not one of one spelling', () => {
    const report = new SpellReport(DEFAULT_WOLF_LIMITS);
    report.note(note('F#4', 0), 0);
    report.note(note('Gb3', 100), 48);
    report.note(note('F#3', 200), 96);
    const text = report.summaryText({ accidentals: 'ascii' });
    // In quarter-comma meantone G♭ lies a lesser diesis, 128/125 = 41.06 cents, above F♯ (common practice, no source).
    expect(text).toMatch(/octave +Gb-F# +-41\.1 cents from pure, 1x \(spelled as an augmented seventh\)/u);
    expect(report.wolfList().filter((w) => w.kind === 'octave')).toHaveLength(1); // F♯3 against F♯4 is a pure octave
  });

  it('lists the white keys spelled with another letter (E♯, B♯ in C♯ major), and none when there are none', () => {
    const report = new SpellReport(DEFAULT_WOLF_LIMITS);
    for (const [i, s] of ['C#4', 'E#4', 'G#4', 'B#3', 'E#5', 'C4'].entries()) report.note(note(s, i * 100), i * 48);
    const text = report.summaryText({ accidentals: 'ascii' });
    // Listed by the white key played: the F key spelled E♯, the C key B♯.
    expect(text).toMatch(/white keys spelled otherwise:\n {2}C +1 B#\n {2}F +2 E#\n/u);
    const plain = new SpellReport(DEFAULT_WOLF_LIMITS);
    plain.note(note('C4', 0), 0);
    expect(plain.summaryText({ accidentals: 'ascii' })).not.toMatch(/white keys/u);
  });

  it('names the keys the speller followed, most notes first, leaving out those under 2 %', () => {
    const report = new SpellReport(DEFAULT_WOLF_LIMITS);
    // G♯ major has eight sharps: a key the follow speller names but a player cannot declare.
    const gSharpMajor = { tonic: pitchClass(8), mode: 'major' as const };
    const counts: Array<[DeclaredKey, number]> = [[parseKey('C# major'), 60], [gSharpMajor, 30], [parseKey('A# minor'), 9], [parseKey('D# minor'), 1]];
    for (const [key, n] of counts) for (let i = 0; i < n; i++) report.countKey(key);
    expect(report.summaryText({ accidentals: 'ascii' })).toMatch(/^keys followed: C# major 60 %, G# major 30 %, A# minor 9 %$/mu);
    expect(new SpellReport(DEFAULT_WOLF_LIMITS).summaryText({ accidentals: 'ascii' })).not.toMatch(/keys followed/u);
  });
});
