import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { XMLParser, XMLValidator } from 'fast-xml-parser';
import { describe, expect, it } from 'vitest';
import { buildChart, type Chart } from '../../src/chart/chart.js';
import { barScaleCents, chartSvg, signedFigure } from '../../src/chart/chart-svg.js';
import { formatSpelledPitch, parseFifthsRange } from '../../src/pitch/index.js';
import { loadTuningPreset } from '../../src/presets/tuning-presets.js';
import { DEFAULT_WOLF_LIMITS, parseReference } from '../../src/tuning/index.js';
import { runCli } from '../cli/run-cli.js';
import { tempDir } from '../support/temp.js';

type Node = Record<string, unknown>;

/** Every element named `name` anywhere under `node` (fast-xml-parser's preserveOrder form). */
function findAll(node: unknown, name: string, out: Node[] = []): Node[] {
  if (Array.isArray(node)) for (const n of node) findAll(n, name, out);
  else if (node && typeof node === 'object') {
    for (const [key, value] of Object.entries(node)) {
      if (key === name) out.push(node as Node);
      if (key !== ':@') findAll(value, name, out);
    }
  }
  return out;
}
const attrs = (n: Node): Record<string, string> => (n[':@'] ?? {}) as Record<string, string>;
const withClass = (nodes: Node[], cls: string): Node[] => nodes.filter((n) => (attrs(n)['@_class'] ?? '').split(' ').includes(cls));
const textOf = (n: unknown): string => findAll(n, '#text').map((t) => String(t['#text'])).join('');

function parseSvg(svg: string): unknown {
  // An XML parser from the registry (fast-xml-parser), not the code that wrote the picture.
  expect(XMLValidator.validate(svg)).toBe(true);
  return new XMLParser({ ignoreAttributes: false, preserveOrder: true, parseAttributeValue: false, parseTagValue: false, trimValues: false }).parse(svg);
}

function chartOf(id: string, ref: string, range = 'Gb..A#'): Chart {
  return buildChart({ tuning: loadTuningPreset(id).tuning, reference: parseReference(ref), range: parseFifthsRange(range), octave: 4, wolfLimits: DEFAULT_WOLF_LIMITS });
}

describe('the tuning picture (chart as SVG)', () => {
  it('draws every spelling of quarter-comma meantone with its distance from 12-ET, bars to scale', () => {
    const chart = chartOf('meantone-1-4', 'A4=415');
    const doc = parseSvg(chartSvg(chart, { title: 'quarter-comma' }));
    const svg = findAll(doc, 'svg')[0]!;
    expect(attrs(svg)['@_xmlns']).toBe('http://www.w3.org/2000/svg');
    const notes = withClass(findAll(doc, 'g'), 'note');
    expect(notes.map((n) => attrs(n)['@_data-name'])).toEqual(chart.notes.map((n) => formatSpelledPitch(n.pitch)));
    const scale = barScaleCents(chart.notes);
    expect(scale).toBe(40); // the largest, G♭ at +30.8, rounds up to 40
    chart.notes.forEach((note, i) => {
      const g = notes[i]!;
      expect(Number(attrs(g)['@_data-fifths'])).toBe(note.fifths);
      expect(Number(attrs(g)['@_data-et-deviation'])).toBeCloseTo(note.etDeviation, 3);
      const bar = withClass(findAll(g, 'rect'), 'bar')[0]!;
      expect(Number(attrs(bar)['@_height'])).toBeCloseTo(Math.max((Math.abs(note.etDeviation) / scale) * 105, 1.5), 1);
      expect(textOf(g)).toContain(signedFigure(note.etDeviation, 1));
    });
    // Handbook figures (quarter-comma meantone: fifths 5.38 cents narrow of pure, major thirds pure,
    // the diesis between enharmonic spellings 41.06 cents; from memory, as in Barbour's tables).
    const g = notes.find((n) => attrs(n)['@_data-name'] === 'G#4')!;
    expect(textOf(g)).toContain('G♯');
    expect(textOf(g)).toContain('\u221217.1'); // G♯4 is five fifths above the reference A4, each fifth 696.58 cents against 12-ET's 700: 5 × −3.42 = −17.1, with a true minus sign
    const fifths = withClass(findAll(doc, 'g'), 'fifth');
    expect(fifths).toHaveLength(chart.notes.length - 1);
    for (const f of fifths) expect(textOf(f)).toBe('\u22125.4');
    const thirds = withClass(findAll(doc, 'g'), 'third');
    for (const t of thirds) expect(textOf(t)).toBe('0.0');
    const gaps = withClass(findAll(doc, 'g'), 'gap');
    expect(gaps.map((n) => attrs(n)['@_data-sharpward'])).toEqual(['F#', 'C#', 'G#', 'D#', 'A#']);
    for (const gap of gaps) expect(textOf(gap)).toContain('41.1 ¢');
    const wolves = withClass(findAll(doc, 'g'), 'wolf-pill');
    expect(wolves.map((w) => `${attrs(w)['@_data-lower']}-${attrs(w)['@_data-upper']}`)).toContain('G#4-Eb5');
    expect(wolves).toHaveLength(chart.intervals.filter((i) => i.wolf).length);
  });

  it('shows Pythagorean fifths pure and its wolf a comma narrow', () => {
    const chart = chartOf('pythagorean', 'C4=256', 'Ab..G#');
    const doc = parseSvg(chartSvg(chart, { title: 'Pythagorean', subtitle: 'a <subtitle> & "quotes"' }));
    for (const f of withClass(findAll(doc, 'g'), 'fifth')) expect(textOf(f)).toBe('0.0');
    // The Pythagorean comma, 531441/524288 = 23.46 cents (a handbook figure).
    const gap = withClass(findAll(doc, 'g'), 'gap')[0]!;
    expect(Number(attrs(gap)['@_data-difference'])).toBeCloseTo(23.46, 2);
    const wolf = withClass(findAll(doc, 'g'), 'wolf-pill').find((w) => attrs(w)['@_data-lower'] === 'G#4')!;
    expect(textOf(wolf)).toBe('G♯–E♭ d6 \u221223.5');
    expect(textOf(findAll(doc, 'text')[1])).toContain('a <subtitle> & "quotes"'); // escaped in the file, read back whole
  });

  it('says when there are no wolves, and never writes a hyphen for a minus', () => {
    const svg = chartSvg(chartOf('werckmeister-3', 'A4=440'), { title: 'Werckmeister III' });
    const doc = parseSvg(svg);
    expect(textOf(findAll(doc, 'svg'))).toContain('no wolves in this range');
    const texts = findAll(doc, 'text').map(textOf);
    expect(texts.filter((t) => /(^|\s)-\d/u.test(t))).toEqual([]);
  });
});

describe('diesis chart --svg, --listen cues, and the table’s details', () => {
  const dir = tempDir('diesis-chart-');

  it('writes the picture to a file', async () => {
    const file = join(dir, 'chart.svg');
    const result = await runCli('chart', 'meantone-1-4', '--ref', 'A4=415', '--svg', file);
    expect(result.code).toBe(0);
    const doc = parseSvg(readFileSync(file, 'utf8'));
    expect(textOf(findAll(doc, 'text')[0])).toBe('1/4-comma meantone (regular)');
    expect(withClass(findAll(doc, 'g'), 'note')).toHaveLength(17);
  });

  it('prints a cue list with each dyad’s start time, so the wolf is found without counting', async () => {
    const file = join(dir, 'listen.wav');
    const result = await runCli('chart', 'meantone-1-4', '--from', 'Eb', '--to', 'G#', '--listen', file);
    expect(result.code).toBe(0);
    const cues = result.stdout.split('\n').filter((l) => /^\d+:\d\d\.\d {2}/u.test(l));
    expect(cues).toHaveLength(11 + 1 + 8 + 4); // the P5s, the d6, the M3s, the d4s of Eb..G#
    // Each dyad lasts 2.5 s plus 0.4 s of silence: the twelfth (the one d6, after 11 fifths) starts at 31.9 s.
    expect(cues[11]).toMatch(/^0:31\.9 {2}G♯4–E♭5\s+d6 {2}wolf$/u);
    expect(cues[0]).toMatch(/^0:00\.0 {2}E♭4–B♭4\s+P5$/u);
    const json = await runCli('chart', 'meantone-1-4', '--from', 'Eb', '--to', 'G#', '--listen', file, '--json');
    expect(() => JSON.parse(json.stdout) as unknown).not.toThrow(); // the cues go to stderr then
    expect(json.stderr).toContain('0:31.9  G♯4–E♭5');
  });

  it('uses one minus sign, the table’s accidentals in the reference line, and a quality header', async () => {
    const unicode = await runCli('chart', 'meantone-1-4', '--ref', 'G#4=415', '--to', 'B#');
    expect(unicode.stdout).toContain('reference G♯4=415 Hz');
    expect(unicode.stdout).toMatch(/B♯4\s+\+12\s+\u221241\.059/u); // B♯ a diesis below C: the cents column signs it too
    expect(unicode.stdout).not.toMatch(/(^|\s)-\d/mu);
    expect(unicode.stdout).toMatch(/interval\s+quality\s+cents/u);
    const ascii = await runCli('chart', 'meantone-1-4', '--ref', 'G#4=415', '--to', 'B#', '--ascii');
    expect(ascii.stdout).toContain('reference G#4=415 Hz');
    expect(ascii.stdout).toMatch(/B#4\s+\+12\s+-41\.059/u);
  });
});
