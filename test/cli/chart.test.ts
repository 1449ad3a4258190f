import { describe, expect, it } from 'vitest';
import { runCli } from './run-cli.js';
import { tempDir } from '../support/temp.js';

interface JsonChart {
  tuning: { id: string; name: string; kind: string; source: string };
  reference: { note: string; hz: number };
  origin: string;
  octave: number;
  range: { from: string; to: string };
  notes: { name: string; fifths: number; key: number; cents: number; hz: number; exactHz: string | null; etDeviation: number }[];
  enharmonics: { sharpward: string; flatward: string; difference: number }[];
  intervals: { kind: string; quality: string; lower: string; upper: string; cents: number; pure: string; deviation: number; beats: number; wolf: boolean }[];
}

describe('diesis chart', () => {
  it('prints a readable quarter-comma table at A4 = 415 with ♯ and ♭', async () => {
    const { code, stdout, stderr } = await runCli('chart', 'meantone-1-4', '--ref', 'A4=415');
    expect(stderr).toBe('');
    expect(code).toBe(0);
    expect(stdout).toContain('1/4-comma meantone');
    expect(stdout).toMatch(/G♯4\s+\+8\s+772\.627\s+387\.856\s+−17\.108/u); // 415·2^((772.627−889.735)/1200)
    expect(stdout).toMatch(/A4\s+\+3\s+889\.735\s+415\.000\s+0\.000/u);
    expect(stdout).toContain('G♯/A♭ −41.059');
    expect(stdout).toMatch(/G♯4–E♭5\s+d6\s+737\.637\s+3\/2\s+\+35\.682\s+\d+\.\d\d\s+wolf/u);
    expect(stdout).not.toContain('\u001b['); // no colour off a terminal
  });

  it('prints Pythagorean at C4 = 100 with --ascii', async () => {
    const { code, stdout } = await runCli('chart', 'pythagorean', '--ref', 'C4=100', '--ascii');
    expect(code).toBe(0);
    expect(stdout).toMatch(/G#4\s+\+8\s+815\.640\s+160\.181/u);
    expect(stdout).toMatch(/Ab4\s+-4\s+792\.180\s+158\.025/u);
    expect(stdout).toContain('G#/Ab +23.460');
    expect(stdout).not.toMatch(/[♯♭]/u);
  });

  it('writes the documented JSON fields', async () => {
    const { code, stdout } = await runCli('chart', 'pythagorean', '--ref', 'C4=100', '--json', '--from', 'Ab', '--to', 'G#');
    expect(code).toBe(0);
    const chart = JSON.parse(stdout) as JsonChart;
    expect(chart.tuning.id).toBe('pythagorean');
    expect(chart.reference).toEqual({ note: 'C4', hz: 100 });
    expect(chart.range).toEqual({ from: 'Ab', to: 'G#' });
    expect(chart.notes).toHaveLength(13);
    const gSharp = chart.notes.find((n) => n.name === 'G#4');
    expect(gSharp).toMatchObject({ fifths: 8, key: 68, exactHz: '164025/1024' });
    expect(gSharp?.hz).toBeCloseTo(160.1807, 4);
    expect(gSharp?.cents).toBeCloseTo(815.64, 3);
    const wolf = chart.intervals.find((i) => i.lower === 'G#4' && i.upper === 'Eb5');
    expect(wolf).toMatchObject({ kind: 'fifth', quality: 'd6', pure: '3/2', wolf: true });
    expect(wolf?.deviation).toBeCloseTo(-23.46, 3); // the Pythagorean wolf is a comma narrow
    expect(chart.intervals.filter((i) => i.kind === 'fifth' && i.quality === 'P5').every((i) => !i.wolf)).toBe(true);
    expect(chart.enharmonics).toEqual([{ sharpward: 'G#', flatward: 'Ab', difference: expect.closeTo(23.46, 3) as number }]);
  });

  it('writes notes or intervals as CSV', async () => {
    const notes = await runCli('chart', 'edo-31', '--csv');
    expect(notes.stdout.split('\n')[0]).toBe('name,fifths,cents,hz,etDeviation');
    expect(notes.stdout.split('\n').filter(Boolean)).toHaveLength(18);
    const intervals = await runCli('chart', 'werckmeister-3', '--csv', 'intervals');
    expect(intervals.stdout.split('\n')[0]).toBe('kind,quality,lower,upper,cents,pure,deviation,beats,wolf');
    expect((await runCli('chart', 'edo-31', '--csv', 'chords')).code).toBe(2);
  });

  /** The number of decimal places a figure prints with (JSON and CSV print the shortest form). */
  const places = (n: number): number => (String(n).includes('e') ? Infinity : (String(n).split('.')[1] ?? '').length);

  it('rounds its JSON figures: cents to 4 places, Hz to 6, no float noise', async () => {
    const { stdout } = await runCli('chart', 'edo-12', '--json');
    expect(stdout).not.toMatch(/\d[eE][-+]?\d/u);
    const chart = JSON.parse(stdout) as JsonChart;
    // 12-ET: every fifth is 700 cents and every major third 400, both exactly (common practice, no source).
    for (const i of chart.intervals) expect(i.cents, `${i.lower}-${i.upper}`).toBe(i.kind === 'fifth' ? 700 : 400);
    for (const n of chart.notes) expect(n.etDeviation, n.name).toBe(0);
    for (const n of chart.notes) expect(places(n.hz), n.name).toBeLessThanOrEqual(6);
    for (const i of chart.intervals) for (const v of [i.deviation, i.beats]) expect(places(v)).toBeLessThanOrEqual(4);
    const pythagorean = JSON.parse((await runCli('chart', 'pythagorean', '--ref', 'C4=100', '--json')).stdout) as JsonChart;
    // Pythagorean G♯4 over C4 = 100 Hz is 3^8/2^12 = 6561/4096, 164025/1024 Hz = 160.1806640625 exactly (common practice, no source), printed to the micro-hertz; exactHz keeps the fraction.
    expect(pythagorean.notes.find((n) => n.name === 'G#4')).toMatchObject({ hz: 160.180664, exactHz: '164025/1024' });
  });

  it('rounds its CSV figures as its JSON', async () => {
    const notes = (await runCli('chart', 'edo-12', '--csv')).stdout.trim().split('\n').slice(1);
    for (const line of notes) expect(line.split(',')[4], line).toBe('0'); // etDeviation in 12-ET (common practice, no source)
    const intervals = (await runCli('chart', 'edo-12', '--csv', 'intervals')).stdout.trim().split('\n').slice(1);
    for (const line of intervals) expect(['700', '400'], line).toContain(line.split(',')[4]);
    expect(intervals.join('\n')).not.toMatch(/\d[eE][-+]?\d/u);
  });

  it('uses the preset’s reference unless --ref is given', async () => {
    const { stdout } = await runCli('chart', 'presets/examples/custom-tuning.json', '--json');
    expect((JSON.parse(stdout) as JsonChart).reference).toEqual({ note: 'A4', hz: 415 });
  });

  it.each([
    [['chart', 'nope'], 1, /^diesis: unknown tuning "nope"/u],
    [['chart', 'pythagorean', '--ref', 'A4=0'], 2, /^diesis: --ref "A4=0": 0 Hz is outside 1–20000 Hz$/mu],
    [['chart', 'pythagorean', '--ref', 'A4'], 2, /^diesis: --ref "A4" must be NOTE=HZ/mu],
    [['chart', 'pythagorean', '--from', 'G#', '--to', 'Eb'], 2, /runs flatward/u],
    [['chart', 'pythagorean', '--octave', 'x'], 2, /^diesis: --octave "x" must be a whole number/mu],
    [['chart'], 2, /^diesis: missing required argument 'tuning'$/mu],
    [['frobnicate'], 2, /^diesis: unknown command 'frobnicate'/mu],
  ])('fails in one line: %j', async (args, code, message) => {
    const result = await runCli(...args);
    expect(result.code).toBe(code);
    expect(result.stderr).toMatch(message);
    expect(result.stderr.trim().split('\n')).toHaveLength(1);
  });
});

describe('diesis presets and check', () => {
  it('lists every preset with kind, description and source', async () => {
    const { code, stdout } = await runCli('presets');
    expect(code).toBe(0);
    expect(stdout).toMatch(/werckmeister-3\s+circulating\s+Werckmeister III/u);
    expect(stdout).toContain('source: A. Werckmeister, Musicalische Temperatur (1691)');
    const json = JSON.parse((await runCli('presets', '--json')).stdout) as { id: string }[];
    expect(json.map((p) => p.id)).toContain('meantone-1-4');
  });

  it('validates the shipped setup files, and names the path of a setup’s problems', async () => {
    for (const f of ['mpe-synth', 'multitimbral-sampler', 'mts-synth']) expect((await runCli('check', `presets/setups/${f}.json`)).code, f).toBe(0);
    const { writeFileSync } = await import('node:fs');
    const { join } = await import('node:path');
    const file = join(tempDir('diesis-'), 'setup.json');
    writeFileSync(file, JSON.stringify({ output: { mode: 'bend', bendRange: 500 }, controls: [{ cc: 4, action: 'wiggle' }] }));
    const bad = await runCli('check', file);
    expect(bad.code).toBe(1);
    // FILE:LINE: where: what (the file is written on one line by JSON.stringify).
    expect(bad.stderr).toMatch(/setup\.json:1: output\.bendRange: 500 is above 96/u);
    expect(bad.stderr).toMatch(/setup\.json:1: controls\[0\]\.action: must be one of "flip"/u);
  });

  it('validates a good file and prints every problem of a bad one', async () => {
    expect(await runCli('check', 'presets/meantone-1-4.json')).toMatchObject({ code: 0, stdout: 'presets/meantone-1-4.json: ok: 1/4-comma meantone (regular)\n' });
    const bad = await runCli('check', 'test/fixtures/bad-tuning.json');
    expect(bad.code).toBe(1);
    const lines = bad.stderr.trim().split('\n');
    expect(lines).toEqual([
      'test/fixtures/bad-tuning.json:8: chain.fifths[2]: unknown comma "pythagorian" (use syntonic, pythagorean, schisma, diaschisma, diesis, septimal, or a ratio such as 81/80)',
      'test/fixtures/bad-tuning.json:8: chain.fifths[7]: cents "seven hundred" is not a decimal number',
      'diesis: test/fixtures/bad-tuning.json: 2 problems',
    ]);
  });
});

describe('check lists problems in file order', () => {
  it('prints each problem at its line, top to bottom, whatever order they were found in', async () => {
    const { writeFileSync } = await import('node:fs');
    const { join } = await import('node:path');
    const file = join(tempDir('diesis-check-order-'), 'setup.json');
    writeFileSync(file, '{\n  "tuning": "nosuch-tuning",\n  "output": { "mode": "bend", "bendRange": 500 },\n  "spelling": { "strategy": "follow", "gatherMs": 500 }\n}\n');
    const bad = await runCli('check', file);
    expect(bad.code).toBe(1);
    expect(bad.stderr.trim().split('\n').map((l) => /\.json:(\d+):/u.exec(l)?.[1])).toEqual(['2', '3', '4', undefined]);
  });
});

describe('chart options that exclude each other', () => {
  it('refuses --json with --csv, in one line, as a usage mistake', async () => {
    const both = await runCli('chart', 'meantone-1-4', '--json', '--csv');
    expect(both.code).toBe(2);
    expect(both.stderr.trim()).toBe('diesis: --json and --csv each print the whole chart: give one of them');
  });
});
