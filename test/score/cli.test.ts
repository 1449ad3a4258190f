import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { readScoreFile } from '../../src/presets/score-file.js';
import { parseWrittenSpellings } from '../../bench/accuracy.js';
import { runCli } from '../cli/run-cli.js';
import { tempDir } from '../support/temp.js';

// Mozart piano sonatas: the onsets as played (corpus/mozart/NAME.mid) with their written spellings
// (NAME.csv), and the scores (corpus/mozart-scores/NAME.mxl), derived from Craig Stuart Sapp's
// digital edition of the Alte Mozart-Ausgabe, CC BY-NC-SA 4.0 (see each folder's LICENSE.md).
const CORPUS = join(import.meta.dirname, '..', '..', 'corpus');
const take = join(CORPUS, 'mozart', 'sonata01-2.mid');
const score = join(CORPUS, 'mozart-scores', 'sonata01-2.mxl');

interface Row {
  tick: number;
  key: number;
  spelling: string;
  bar: number | string | null;
  match: string;
}

describe('--score on spell and render, and score in a setup', () => {
  it('spell --json gives each note its bar and how it was matched, and every spelling as written', async () => {
    const { code, stdout } = await runCli('spell', take, '--score', score, '--json');
    expect(code).toBe(0);
    const rows = stdout.trim().split('\n').map((l) => JSON.parse(l) as Row);
    expect(Object.keys(rows[0]!)).toEqual(['tick', 'time', 'key', 'channel', 'spelling', 'hz', 'cents', 'bar', 'match']);
    expect(rows.every((r) => ['score', 'ornament', 'fallback'].includes(r.match))).toBe(true);
    expect(rows.filter((r) => r.match === 'score').length).toBeGreaterThan(0.98 * rows.length);
    const read = readScoreFile(score);
    const lastBar = read.measures[read.groups[read.groups.length - 1]!.measure]!.number;
    expect(rows[rows.length - 1]!.bar).toBe(Number(lastBar)); // the bar of the score's last onset
    const written = parseWrittenSpellings(readFileSync(take.replace(/\.mid$/u, '.csv'), 'utf8'));
    const wrong = rows.filter((r, i) => written[i]!.key !== r.key || written[i]!.spelling !== r.spelling);
    expect(wrong).toEqual([]);
  });

  it('spell and render summaries count each kind of match', async () => {
    const spelled = await runCli('spell', take, '--score', score, '--ascii');
    expect(spelled.stdout).toMatch(/1231 notes: \d+ matched to the score, \d+ spelled from it \(ornaments, extra or wrong notes\), 0 by the fallback strategy while lost/u);
    expect(spelled.stdout).toMatch(/spelling from the score, else follow/u);
    const dir = tempDir();
    const rendered = await runCli('render', take, '-o', join(dir, 'out.mid'), '--score', score);
    expect(rendered.code).toBe(0);
    expect(rendered.stdout).toMatch(/score +\d+ matched to the score/u);
  });

  it('takes "score" from a setup, relative to the setup file’s folder', async () => {
    const dir = tempDir();
    writeFileSync(join(dir, 'piece.mxl'), readFileSync(score));
    writeFileSync(join(dir, 'setup.json'), JSON.stringify({ name: 'with a score', score: 'piece.mxl' }));
    const { code, stdout } = await runCli('spell', take, '--setup', join(dir, 'setup.json'), '--json');
    expect(code).toBe(0);
    expect(stdout.split('\n')[0]).toMatch(/"match":"score"/u);
  });

  it('a missing or unreadable score is one line and exit code 1', async () => {
    const missing = await runCli('spell', take, '--score', 'no-such-score.mxl');
    expect(missing.code).toBe(1);
    expect(missing.stderr.trim()).toBe('diesis: no-such-score.mxl: no such file');
    const dir = tempDir();
    writeFileSync(join(dir, 'broken.musicxml'), '<score-partwise><part id="P1"><measure number="4"><note><pitch><step>C</step><octave>4</octave></pitch></note></measure></part></score-partwise>');
    const broken = await runCli('spell', take, '--score', join(dir, 'broken.musicxml'));
    expect(broken.code).toBe(1);
    expect(broken.stderr.trim().split('\n')).toHaveLength(1);
    expect(broken.stderr).toMatch(/broken\.musicxml: part P1, measure 4: <note> has no valid <duration>/u);
  });
});

describe('the stage display line', () => {
  it('shows the bar while following and says plainly when lost', async () => {
    const { scoreStatus } = await import('../../src/score/score-status.js');
    const { ScoreSpeller } = await import('../../src/score/score-speller.js');
    const { ControlledSpeller } = await import('../../src/spelling/controlled.js');
    const { WindowSpeller } = await import('../../src/spelling/speller.js');
    const plain = new ControlledSpeller(new WindowSpeller());
    expect(scoreStatus(plain)).toBeUndefined();
    const read = readScoreFile(score);
    const speller = new ControlledSpeller(new ScoreSpeller(read, new WindowSpeller()));
    expect(scoreStatus(speller)).toBe('score  following, waiting for the first note');
    const first = read.groups[0]!;
    speller.spell(first.keys.map((key) => ({ key, velocity: 64, time: 0, channel: 0, source: 0 })));
    expect(scoreStatus(speller)).toBe(`score  following, bar ${read.measures[first.measure]!.number}`);
    // a cluster of keys far below the movement's range, again and again: nothing in the score is near
    for (let i = 0; i < 12; i++) speller.spell([{ key: 21 + (i % 3), velocity: 64, time: 1000 + 100 * i, channel: 0, source: 0 }]);
    expect(scoreStatus(speller)).toMatch(/^score {2}LOST/u);
  });
});

describe('diesis check on a setup with a score', () => {
  it('reads the score too: ok with its size, or one line naming what is wrong', async () => {
    const dir = tempDir();
    writeFileSync(join(dir, 'piece.mxl'), readFileSync(score));
    writeFileSync(join(dir, 'setup.json'), JSON.stringify({ score: 'piece.mxl' }));
    const ok = await runCli('check', join(dir, 'setup.json'));
    expect(ok.code).toBe(0);
    expect(ok.stdout).toMatch(/ok: setup, score piece\.mxl \(77 measures, 1231 notes\)/u); // 1231 onsets: corpus/mozart/sonata01-2.csv
    writeFileSync(join(dir, 'bad.json'), JSON.stringify({ score: 'missing.musicxml' }));
    const bad = await runCli('check', join(dir, 'bad.json'));
    expect(bad.code).toBe(1);
    expect(bad.stderr).toMatch(/missing\.musicxml: no such file/u);
  });
});

describe('a score that does not match the performance', () => {
  it('says so when most notes cannot be followed in it', async () => {
    const other = join(CORPUS, 'mozart-scores', 'sonata01-1.mxl');
    const wrong = await runCli('spell', take, '--score', other);
    expect(wrong.code).toBe(0);
    expect(wrong.stderr).toMatch(/^diesis: warning: \d+% of the notes could not be followed in the score: is it the score of this piece/mu);
    expect((await runCli('spell', take, '--score', score)).stderr).toBe('');
  });
});
