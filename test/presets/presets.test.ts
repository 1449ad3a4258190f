import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { builtInTuningIds, checkTuningPreset, loadBuiltInTuningPresets, loadTuningPreset, PRESETS_DIR } from '../../src/presets/tuning-presets.js';
import { tempDir } from '../support/temp.js';

const REQUIRED_IDS = [
  'just-adaptive',
  'just-adaptive-pure',
  'just-adaptive-7',
  'pythagorean',
  'meantone-1-3',
  'meantone-2-7',
  'meantone-1-4',
  'meantone-1-5',
  'meantone-1-6',
  'edo-12',
  'edo-19',
  'edo-31',
  'edo-53',
  'just-major',
  'just-minor',
  'werckmeister-3',
  'kirnberger-3',
  'vallotti',
  'young-2',
];

const problemsOf = (json: unknown) => checkTuningPreset(JSON.stringify(json), 'mine.json').problems.map((p) => `${p.path}: ${p.message}`);

describe('tuning presets', () => {
  it('ships every required preset, each valid and naming its source', () => {
    expect(builtInTuningIds()).toEqual(expect.arrayContaining(REQUIRED_IDS));
    for (const preset of loadBuiltInTuningPresets()) {
      expect(preset.source.length, preset.id).toBeGreaterThan(10);
      expect(preset.description.length).toBeGreaterThan(10);
    }
  });

  it('loads a user file by path wherever an id goes, and the shipped example is valid', () => {
    const example = loadTuningPreset(join(PRESETS_DIR, 'examples', 'custom-tuning.json'));
    expect(example.kind).toBe('circulating');
    expect(example.reference?.hz.valueOf()).toBe(415);
  });

  it('names the file, the JSON path and the problem', () => {
    expect(problemsOf({ name: 'x', kind: 'regular', description: 'd', source: 's', fifth: '-1/4 syntonnic' })).toEqual([
      '$.fifth: unknown comma "syntonnic" (use syntonic, pythagorean, schisma, diaschisma, diesis, septimal, or a ratio such as 81/80)',
    ]);
    expect(problemsOf({ name: 'x', kind: 'wobbly', description: 'd', source: 's' })[0]).toMatch(/^\$\.kind: kind must be/u);
  });

  it('collects every problem instead of stopping at the first', () => {
    const problems = problemsOf({
      name: 'x',
      kind: 'just',
      description: 'd',
      source: 's',
      tonic: 'Q',
      degrees: { C: '1/1', 'E#b': '5/4', G: '0/2' },
    });
    expect(problems).toHaveLength(3);
    expect(problems[0]).toMatch(/^\$\.tonic: /u);
    expect(problems[1]).toMatch(/^\$\.degrees\.E#b: /u);
    expect(problems[2]).toMatch(/^\$\.degrees\.G: .*not a positive ratio/u);
    const structural = problemsOf({ kind: 'regular', fifth: 3, extra: true });
    expect(structural.length).toBeGreaterThanOrEqual(4); // name, description, source missing; fifth wrong; extra key
    expect(structural.some((p) => p.includes('extra'))).toBe(true);
  });

  it('checks circulating tables for all 12 keys, an origin at 0, and a chain of 11 fifths', () => {
    const base = { name: 'x', kind: 'circulating', description: 'd', source: 's' };
    expect(problemsOf({ ...base, cents: { C: 0, G: 700 } })).toEqual([
      '$.cents: must give all 12 keys; missing 10 (semitone steps 1, 2, 3, 4, 5, 6, 8, 9, 10, 11 above the origin)',
    ]);
    const twelve = { C: 0, 'C#': 100, D: 200, Eb: 300, E: 400, F: 500, 'F#': 600, G: 700, 'G#': 800, A: 900, Bb: 1000, B: 1100 };
    expect(problemsOf({ ...base, cents: twelve })).toEqual([]);
    expect(problemsOf({ ...base, cents: { ...twelve, C: 5 } })).toEqual(['$.cents: the origin must be at 0 cents']);
    expect(problemsOf({ ...base, cents: { ...twelve, Db: 100 } })[0]).toMatch(/Db shares its key/u);
    expect(problemsOf({ ...base, chain: { start: 'Ab', fifths: ['pure'] } })[0]).toMatch(/\$\.chain\.fifths: must list 11 fifths/u);
  });

  it('reports unknown ids, unreadable files and bad JSON in one line', () => {
    expect(() => loadTuningPreset('meantone-9-9')).toThrow(/^unknown tuning "meantone-9-9": did you mean meantone-1-/u);
    expect(() => loadTuningPreset('xyzzy')).toThrow(/^unknown tuning "xyzzy": run "diesis presets"/u);
    expect(() => loadTuningPreset('/nonexistent/x.json')).toThrow(/^\/nonexistent\/x\.json: no such file$/u);
    const dir = tempDir('diesis-');
    const bad = join(dir, 'bad.json');
    writeFileSync(bad, '{ "name": ');
    expect(() => loadTuningPreset(bad)).toThrow(/bad\.json:1:11: not valid JSON: value expected/u); // FILE:LINE:COLUMN of the missing value
    const twoProblems = join(dir, 'two.json');
    writeFileSync(twoProblems, JSON.stringify({ kind: 'regular', fifth: 'pure', name: 'x', description: 'd' , source: 's', origin: 'Z', reference: 'A4=0.5' }));
    expect(() => loadTuningPreset(twoProblems)).toThrow(/two\.json:1: origin: .*\(and 1 more problem; run "diesis check/u);
  });
});
