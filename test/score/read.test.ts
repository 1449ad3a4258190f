import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { strToU8, zipSync } from 'fflate';
import { describe, expect, it } from 'vitest';
import { formatSpelledPitch } from '../../src/pitch/index.js';
import { impliedSpelling } from '../../src/score/implied-spelling.js';
import { readMusicXml } from '../../src/score/musicxml.js';
import { readScoreFile } from '../../src/presets/score-file.js';
import type { OnsetGroup, Score } from '../../src/score/score.js';
import { unfoldMeasures } from '../../src/score/structure.js';
import { UserError } from '../../src/util/errors.js';
import { tempDir } from '../support/temp.js';

const FIXTURES = join(import.meta.dirname, '..', 'fixtures', 'score');
const ascii = { accidentals: 'ascii' } as const;
const names = (g: OnsetGroup): string[] => g.notes.map((n) => formatSpelledPitch(n.pitch, ascii));
const read = (text: string, file = 'inline.musicxml'): Score => readMusicXml(new TextEncoder().encode(text), file);

/** A one-part score around the given measures (divisions 1 unless the measures set them). */
function wrap(measures: string): string {
  return `<?xml version="1.0"?><score-partwise version="4.0"><part-list><score-part id="P1"><part-name>K</part-name></score-part></part-list><part id="P1">${measures}</part></score-partwise>`;
}
const quarter = (step: string, octave = 4, extra = ''): string => `<note><pitch><step>${step}</step><octave>${octave}</octave></pitch><duration>1</duration>${extra}</note>`;
const ATTRS = '<attributes><divisions>1</divisions></attributes>';

describe('reading MusicXML', () => {
  // The expected onsets below are read off the fixture by the rules of the MusicXML 4.0
  // specification: <chord/> shares the previous onset, <backup>/<forward> move the cursor,
  // <tie type="stop"/> continues a sound, <grace/> takes no time, <pitch> gives the written note.
  const score = readScoreFile(join(FIXTURES, 'features.musicxml'));

  it('groups onsets across staves and voices, in time order, with graces before their note', () => {
    expect(score.title).toBe('Fixture: features');
    expect(score.groups.map((g) => [g.time, names(g).sort()])).toEqual([
      [0, ['B4', 'G2', 'G4']],
      [1, ['A4']], // the grace note, just before the F it leads to
      [1, ['F5']],
      [1.5, ['F5']],
      [2, ['D3', 'D5']], // the tied G4 is no new onset
      [2.5, ['E4']], // voice 2 crossing to staff 1
      [3, ['A4']], // not printed: an ornament's realisation
      [3.25, ['G4']],
      [3.5, ['Bb4']],
    ]);
  });

  it('marks grace and unprinted notes as optional, and keeps staff and voice', () => {
    expect(score.groups.map((g) => g.optional)).toEqual([false, true, false, false, false, false, true, true, false]);
    expect(score.groups[1]!.notes[0]!.grace).toBe(true);
    expect(score.groups[6]!.notes[0]!.hidden).toBe(true);
    const crossing = score.groups[5]!.notes[0]!;
    expect([crossing.staff, crossing.voice]).toEqual([1, '2']);
  });

  it('takes each spelling from <pitch>, so an accidental carried through the measure needs no <accidental>', () => {
    // measure 1: F natural written once with a natural sign in G major, then again without it
    expect(names(score.groups[2]!)).toEqual(['F5']);
    expect(names(score.groups[3]!)).toEqual(['F5']);
    expect(score.groups[3]!.notes[0]!.key).toBe(77); // F5 = MIDI 77 (MIDI 1.0: C4 = 60)
  });

  it('records measures, numbers and key signatures, with the key change in measure 2', () => {
    expect(score.measures.map((m) => [m.number, m.start, m.length, m.keyFifths])).toEqual([
      ['1', 0, 2, 1],
      ['2', 2, 2, -1],
    ]);
    expect(score.groups.map((g) => g.keyFifths)).toEqual([1, 1, 1, 1, -1, -1, -1, -1, -1]);
  });

  it('spells a note the score lacks from its neighbours: the same key nearby, else the accidentals in force, else the key signature', () => {
    const spell = (group: number, key: number): string => formatSpelledPitch(impliedSpelling(score, group, key), ascii);
    expect(spell(3, 77)).toBe('F5'); // the written F natural right here
    expect(spell(3, 65)).toBe('F4'); // the same key class nearby: F natural, not E#
    expect(spell(8, 70)).toBe('Bb4');
    expect(spell(0, 66)).toBe('F#4'); // nothing near: G major's F#
    expect(spell(8, 75)).toBe('Eb5'); // F major: E flat, not D sharp (a chromatic note in the key's window)
    expect(spell(8, 68)).toBe('Ab4');
  });

  it('reads repeats, first and second endings, segno, fine and dal segno', () => {
    const s = readScoreFile(join(FIXTURES, 'repeats.musicxml'));
    expect(s.measures.map((m) => m.endings)).toEqual([[], [], [1], [2], [], []]);
    expect(s.measures[0]!.repeatStart).toBe(true);
    expect(s.measures[2]!.repeatEnd).toBe(2);
    // the notes climb by step from C4, two to a measure: group 2m is the first of measure m+1
    expect(s.jumps).toEqual(
      expect.arrayContaining([
        { from: 5, to: 0, kind: 'repeat' }, // end of the first ending back to the start
        { from: 3, to: 6, kind: 'ending' }, // second time: from measure 2 into the second ending
        { from: 11, to: 8, kind: 'dal-segno' },
      ]),
    );
    expect(s.jumps).toHaveLength(3);
    // played: 1 2 3 | 1 2 4 5 6 | D.S. 5 Fine (common practice, no source)
    expect(unfoldMeasures(s).map((m) => s.measures[m]!.number)).toEqual(['1', '2', '3', '1', '2', '4', '5', '6', '5']);
  });

  it('spells a written ornament’s auxiliary note from its accidental mark (MusicXML 4.0 <accidental-mark> in <ornaments>)', () => {
    const ornaments = (inner: string): string => `<notations><ornaments>${inner}</ornaments></notations>`;
    const s = read(
      wrap(
        `<measure number="1">${ATTRS}` +
          quarter('E', 4, ornaments('<mordent/><accidental-mark placement="below">sharp</accidental-mark>')) + // lower note D#4
          quarter('C', 5, ornaments('<turn/><accidental-mark placement="above">flat</accidental-mark><accidental-mark placement="below">sharp</accidental-mark>')) + // Db5 above, B#4 below
          quarter('B', 4, ornaments('<trill-mark/><accidental-mark>sharp</accidental-mark>')) + // upper note C#5
          quarter('G', 4, ornaments('<trill-mark/>')) + // unmarked: as the key has it
          '</measure>',
      ),
    );
    expect(s.groups.map((g) => g.notes[0]!.auxiliaries.map((a) => formatSpelledPitch(a, ascii)))).toEqual([['D#4'], ['Db5', 'B#4'], ['C#5'], []]);
    const spell = (group: number, key: number): string => formatSpelledPitch(impliedSpelling(s, group, key), ascii);
    expect(spell(0, 63)).toBe('D#4'); // C major's own window would say Eb
    expect(spell(1, 73)).toBe('Db5');
    expect(spell(2, 73)).toBe('C#5'); // the trill on B, a group later, marks C#
    expect(spell(3, 69)).toBe('A4');
  });

  it('reads da capo and a repeat with no forward barline (back to the start)', () => {
    const s = read(wrap(`<measure number="1">${ATTRS}${quarter('C')}</measure><measure number="2">${quarter('D')}<barline location="right"><repeat direction="backward"/></barline></measure><measure number="3">${quarter('E')}<sound dacapo="yes"/></measure>`));
    expect(s.jumps).toEqual([
      { from: 1, to: 0, kind: 'repeat' },
      { from: 2, to: 0, kind: 'da-capo' },
    ]);
    expect(unfoldMeasures(s)).toEqual([0, 1, 0, 1, 2, 0, 1, 2]);
  });

  it('reads a compressed .mxl through its META-INF/container.xml (MusicXML 4.0 compressed format)', () => {
    const dir = tempDir();
    const file = join(dir, 'piece.mxl');
    const container = '<?xml version="1.0"?><container><rootfiles><rootfile full-path="music/piece.musicxml"/></rootfiles></container>';
    writeFileSync(file, zipSync({ 'META-INF/container.xml': strToU8(container), 'music/piece.musicxml': new Uint8Array(readFileSync(join(FIXTURES, 'repeats.musicxml'))) }));
    const zipped = readScoreFile(file);
    expect(zipped.groups.map((g) => names(g)[0])).toEqual(['C4', 'D4', 'E4', 'F4', 'G4', 'A4', 'B4', 'C5', 'D5', 'E5', 'F5', 'G5']);
  });

  it('reads parts as one score, each measure as long as its longest part', () => {
    const two = `<?xml version="1.0"?><score-partwise><part-list/><part id="A"><measure number="1">${ATTRS}${quarter('C', 5)}${quarter('D', 5)}</measure><measure number="2">${quarter('E', 5)}</measure></part><part id="B"><measure number="1"><attributes><divisions>2</divisions></attributes><note><pitch><step>C</step><octave>3</octave></pitch><duration>4</duration></note></measure><measure number="2"><note><pitch><step>G</step><octave>2</octave></pitch><duration>2</duration></note></measure></part></score-partwise>`;
    const s = read(two);
    expect(s.groups.map((g) => [g.time, names(g).sort()])).toEqual([
      [0, ['C3', 'C5']],
      [1, ['D5']],
      [2, ['E5', 'G2']],
    ]);
  });

  it('sounds a transposing part at concert pitch (<transpose>: a B-flat instrument)', () => {
    const s = read(wrap(`<measure number="1"><attributes><divisions>1</divisions><transpose><diatonic>-1</diatonic><chromatic>-2</chromatic></transpose></attributes>${quarter('D')}${quarter('F', 4, '').replace('<step>F</step>', '<step>F</step><alter>1</alter>')}</measure>`));
    expect(s.groups.map((g) => names(g)[0])).toEqual(['C4', 'E4']); // written D4 and F#4 sound C4 and E4
  });

  describe('problems are one line naming the file, the part and the measure', () => {
    const fails = (text: string, pattern: RegExp): void => {
      let error: unknown;
      try {
        read(text, 'bad.musicxml');
      } catch (e) {
        error = e;
      }
      expect(error).toBeInstanceOf(UserError);
      expect((error as Error).message).not.toContain('\n');
      expect((error as Error).message).toMatch(pattern);
    };
    it('malformed XML', () => fails('<score-partwise><part id="P1"><measure></part>', /^bad\.musicxml: line \d+: not well-formed XML/u));
    it('not a score', () => fails('<html/>', /bad\.musicxml: not a MusicXML score/u));
    it('a timewise score', () => fails('<score-timewise/>', /timewise/u));
    it('a note with no duration', () => fails(wrap(`<measure number="7">${ATTRS}<note><pitch><step>C</step><octave>4</octave></pitch></note></measure>`), /^bad\.musicxml: part P1, measure 7: <note> has no valid <duration>$/u));
    it('a bad step', () => fails(wrap(`<measure number="3">${ATTRS}<note><pitch><step>H</step><octave>4</octave></pitch><duration>1</duration></note></measure>`), /measure 3: a <pitch> has no valid <step>/u));
    it('a microtonal alter', () => fails(wrap(`<measure number="2">${ATTRS}<note><pitch><step>C</step><alter>0.5</alter><octave>4</octave></pitch><duration>1</duration></note></measure>`), /measure 2: .*microtonal/u));
    it('durations before divisions', () => fails(wrap(`<measure number="1">${quarter('C')}</measure>`), /measure 1: a duration comes before <divisions>/u));
    it('a wrong extension, a missing file, an empty archive', () => {
      expect(() => readScoreFile('piece.pdf')).toThrow(/piece\.pdf: a score must be MusicXML/u);
      expect(() => readScoreFile(join(FIXTURES, 'missing.mxl'))).toThrow(/missing\.mxl: no such file/u);
      const dir = tempDir();
      writeFileSync(join(dir, 'empty.mxl'), zipSync({ 'readme.txt': strToU8('hello') }));
      expect(() => readScoreFile(join(dir, 'empty.mxl'))).toThrow(/empty\.mxl: the \.mxl archive holds no MusicXML file/u);
    });
  });
});
