import { formatPitchClass, formatSpelledPitch, type NameStyle, type PitchClass } from '../pitch/index.js';
import { formatReference } from '../tuning/index.js';
import type { Chart, ChartInterval, ChartNote } from './chart.js';

/**
 * The tuning as a picture, for the stage page and `chart --svg`: the line of fifths from its flat
 * end to its sharp end, each spelling a column whose bar shows how far it lies from 12-ET at the
 * reference; between neighbours, how far each fifth is from pure; under each name, how far the
 * major third above it is from pure; then the enharmonic gaps (the two spellings of one key, drawn
 * on one cents ruler) and the wolves in red. Dark ground, large type, strong colours: meant to be
 * read from a metre away. Pure: chart data in, SVG text out.
 */
export interface ChartSvgOptions {
  readonly title: string;
  readonly subtitle?: string | undefined;
}

/** The colours: white on near-black, amber for sharp of 12-ET, sky blue for flat, red for wolves. */
export const PICTURE_COLOURS = {
  ground: '#0b0d10',
  text: '#f5f5f5',
  dim: '#b9c0c8',
  grid: '#3a414b',
  sharp: '#ffb13b',
  flat: '#4cc3ff',
  wolf: '#ff4646',
} as const;

const UNICODE: NameStyle = { accidentals: 'unicode' };
const FONT = "'DejaVu Sans', 'Liberation Sans', Verdana, Arial, sans-serif";
const MARGIN_LEFT = 86;
const MARGIN_RIGHT = 34;
const COLUMN = 68;

/** A number with a sign, one true minus sign (U+2212) for negatives and none for zero. */
export function signedFigure(n: number, digits: number): string {
  const text = Math.abs(n).toFixed(digits);
  if (Number(text) === 0) return text;
  return (n < 0 ? '\u2212' : '+') + text;
}

function escapeXml(text: string): string {
  return text.replace(/&/gu, '&amp;').replace(/</gu, '&lt;').replace(/>/gu, '&gt;').replace(/"/gu, '&quot;');
}

type Attributes = Readonly<Record<string, string | number>>;

function attributes(attrs: Attributes): string {
  return Object.entries(attrs)
    .map(([k, v]) => ` ${k}="${escapeXml(typeof v === 'number' ? round(v) : v)}"`)
    .join('');
}

/** Coordinates to two decimals: enough for any screen, short text. */
function round(n: number): string {
  return String(Math.round(n * 100) / 100);
}

function element(name: string, attrs: Attributes, body?: string): string {
  return body === undefined ? `<${name}${attributes(attrs)}/>` : `<${name}${attributes(attrs)}>${body}</${name}>`;
}

function text(x: number, y: number, content: string, attrs: Attributes = {}): string {
  return element('text', { x, y, ...attrs }, escapeXml(content));
}

const pcName = (pc: PitchClass): string => formatPitchClass(pc, UNICODE);

/** The scale of the bars: the largest deviation rounded up to 10 cents (at least 10). */
export function barScaleCents(notes: readonly ChartNote[]): number {
  const largest = notes.reduce((m, n) => Math.max(m, Math.abs(n.etDeviation)), 0);
  return Math.max(10, Math.ceil(largest / 10 - 1e-9) * 10);
}

export function chartSvg(chart: Chart, options: ChartSvgOptions): string {
  const c = PICTURE_COLOURS;
  const notes = chart.notes;
  const width = MARGIN_LEFT + Math.max(notes.length, 10) * COLUMN + MARGIN_RIGHT;
  const columnX = (i: number): number => MARGIN_LEFT + COLUMN * (i + 0.5);
  const indexOf = new Map(notes.map((n, i) => [n.fifths, i]));
  const body: string[] = [];

  // Heading.
  body.push(text(MARGIN_LEFT - 60, 46, options.title, { 'font-size': 32, 'font-weight': 'bold', fill: c.text }));
  const sub = [`reference ${formatReference(chart.reference, UNICODE)} Hz`, options.subtitle].filter(Boolean).join(' · ');
  const room = Math.floor((width - MARGIN_LEFT + 60 - MARGIN_RIGHT) / 10.5);
  body.push(text(MARGIN_LEFT - 60, 76, sub.length > room ? `${sub.slice(0, room - 1)}…` : sub, { 'font-size': 19, fill: c.dim }));

  // The bars: each spelling's distance from 12-ET.
  const scale = barScaleCents(notes);
  const zeroY = 250;
  const half = 105;
  const yOf = (cents: number): number => zeroY - (cents / scale) * half;
  body.push(text(MARGIN_LEFT - 60, 118, 'cents from 12-ET', { 'font-size': 18, fill: c.dim }));
  const legendX = width - MARGIN_RIGHT - 330;
  body.push(element('rect', { x: legendX, y: 104, width: 16, height: 16, fill: c.sharp }));
  body.push(text(legendX + 24, 118, 'above 12-ET', { 'font-size': 18, fill: c.text }));
  body.push(element('rect', { x: legendX + 170, y: 104, width: 16, height: 16, fill: c.flat }));
  body.push(text(legendX + 194, 118, 'below 12-ET', { 'font-size': 18, fill: c.text }));
  for (const level of [scale, scale / 2, 0, -scale / 2, -scale]) {
    const y = yOf(level);
    body.push(element('line', { x1: MARGIN_LEFT, y1: y, x2: width - MARGIN_RIGHT, y2: y, stroke: c.grid, 'stroke-width': level === 0 ? 2.5 : 1, ...(level === 0 ? {} : { 'stroke-dasharray': '4 6' }) }));
    body.push(text(MARGIN_LEFT - 10, y + 6, signedFigure(level, 0), { 'font-size': 17, fill: c.dim, 'text-anchor': 'end' }));
  }
  notes.forEach((n, i) => {
    const x = columnX(i);
    const top = Math.min(yOf(n.etDeviation), zeroY);
    const height = Math.abs(yOf(n.etDeviation) - zeroY);
    const colour = n.etDeviation >= 0 ? c.sharp : c.flat;
    const label = signedFigure(n.etDeviation, 1);
    const labelY = n.etDeviation >= 0 ? top - 9 : top + height + 22;
    body.push(
      element(
        'g',
        { class: 'note', 'data-name': formatSpelledPitch(n.pitch), 'data-fifths': n.fifths, 'data-et-deviation': n.etDeviation.toFixed(3) },
        [
          element('rect', { class: 'bar', x: x - 20, y: top, width: 40, height: Math.max(height, 1.5), fill: colour, rx: 3 }),
          text(x, labelY, label, { 'font-size': 18, 'font-weight': 'bold', fill: colour, 'text-anchor': 'middle' }),
          text(x, 420, pcName(n.pitch), { 'font-size': 36, 'font-weight': 'bold', fill: c.text, 'text-anchor': 'middle' }),
        ].join(''),
      ),
    );
  });

  // Between neighbours: the fifth from each spelling to the next; under each name: the major third above it.
  body.push(text(MARGIN_LEFT - 10, 462, 'fifth', { 'font-size': 16, fill: c.dim, 'text-anchor': 'end' }));
  body.push(text(MARGIN_LEFT - 10, 500, '3rd', { 'font-size': 16, fill: c.dim, 'text-anchor': 'end' }));
  const interval = (i: ChartInterval, x: number, y: number, role: string): string => {
    const colour = i.wolf ? c.wolf : c.text;
    const mark = i.wolf ? element('rect', { x: x - 30, y: y - 20, width: 60, height: 27, rx: 6, fill: 'none', stroke: c.wolf, 'stroke-width': 2.5 }) : '';
    return element(
      'g',
      { class: `interval ${role}${i.wolf ? ' wolf' : ''}`, 'data-lower': formatSpelledPitch(i.lower), 'data-upper': formatSpelledPitch(i.upper), 'data-deviation': i.deviation.toFixed(3) },
      mark + text(x, y, signedFigure(i.deviation, 1), { 'font-size': 17, 'font-weight': i.wolf ? 'bold' : 'normal', fill: colour, 'text-anchor': 'middle' }),
    );
  };
  for (const i of chart.intervals) {
    const from = indexOf.get(i.lower.fifths);
    if (from === undefined) continue;
    if (i.quality === 'P5') body.push(interval(i, columnX(from) + COLUMN / 2, 462, 'fifth'));
    else if (i.quality === 'M3') body.push(interval(i, columnX(from), 500, 'third'));
  }
  body.push(element('line', { x1: MARGIN_LEFT, y1: 522, x2: width - MARGIN_RIGHT, y2: 522, stroke: c.grid, 'stroke-width': 1 }));

  // Enharmonic gaps: both spellings of one key on one ruler of cents from 12-ET.
  let y = 560;
  const gaps = chart.enharmonics;
  if (gaps.length > 0) {
    body.push(text(MARGIN_LEFT - 60, y, 'one key, two spellings: the gap in cents (higher to the right)', { 'font-size': 20, 'font-weight': 'bold', fill: c.text }));
    const tint = (deviation: number): string => (deviation >= 0 ? c.sharp : c.flat);
    const cell = 230;
    const perRow = Math.max(1, Math.floor((width - MARGIN_LEFT + 60 - MARGIN_RIGHT) / cell));
    const dev = new Map(notes.map((n) => [n.fifths, n.etDeviation]));
    gaps.forEach((g, k) => {
      const cx = MARGIN_LEFT - 60 + (k % perRow) * cell + cell / 2;
      const cy = y + 48 + Math.floor(k / perRow) * 104;
      const sharp = dev.get(g.sharpward.fifths) ?? 0;
      const flat = dev.get(g.flatward.fifths) ?? 0;
      const pxPerCent = Math.min(3, 180 / Math.max(Math.abs(g.difference), 1));
      const mid = (sharp + flat) / 2;
      const xs = cx + (sharp - mid) * pxPerCent;
      const xf = cx + (flat - mid) * pxPerCent;
      // Names at least 64 px apart, in the order of their pitches (sharpward on the left when equal).
      const spread = Math.max(Math.abs(xs - xf), 64) / 2;
      const [ls, lf] = xs <= xf ? [cx - spread, cx + spread] : [cx + spread, cx - spread];
      body.push(
        element(
          'g',
          { class: 'gap', 'data-sharpward': formatPitchClass(g.sharpward), 'data-flatward': formatPitchClass(g.flatward), 'data-difference': g.difference.toFixed(3) },
          [
            element('line', { x1: cx - cell / 2 + 14, y1: cy, x2: cx + cell / 2 - 14, y2: cy, stroke: c.grid, 'stroke-width': 2 }),
            element('line', { x1: Math.min(xs, xf), y1: cy, x2: Math.max(xs, xf), y2: cy, stroke: c.text, 'stroke-width': 4 }),
            element('circle', { cx: xs, cy, r: 8, fill: tint(sharp) }),
            element('circle', { cx: xf, cy, r: 8, fill: tint(flat) }),
            text(ls, cy + 36, pcName(g.sharpward), { 'font-size': 24, 'font-weight': 'bold', fill: tint(sharp), 'text-anchor': 'middle' }),
            text(lf, cy + 36, pcName(g.flatward), { 'font-size': 24, 'font-weight': 'bold', fill: tint(flat), 'text-anchor': 'middle' }),
            text(cx, cy - 16, `${Math.abs(g.difference).toFixed(1)} ¢`, { 'font-size': 20, fill: c.text, 'text-anchor': 'middle' }),
          ].join(''),
        ),
      );
    });
    y += 48 + Math.ceil(gaps.length / perRow) * 104;
  }

  // Wolves: every interval in the chart further from pure than the limits.
  const wolves = chart.intervals.filter((i) => i.wolf);
  y += 10;
  body.push(
    text(MARGIN_LEFT - 60, y, wolves.length === 0 ? 'no wolves in this range' : `wolves (fifths more than ${chart.wolfLimits.fifth} ¢, thirds more than ${chart.wolfLimits.third} ¢ from pure)`, {
      'font-size': 20,
      'font-weight': 'bold',
      fill: wolves.length === 0 ? c.text : c.wolf,
    }),
  );
  let x = MARGIN_LEFT - 60;
  y += 22;
  for (const w of wolves) {
    const label = `${pcName(w.lower)}–${pcName(w.upper)} ${w.quality} ${signedFigure(w.deviation, 1)}`;
    const pill = 12 * label.length + 26;
    if (x + pill > width - MARGIN_RIGHT) {
      x = MARGIN_LEFT - 60;
      y += 46;
    }
    body.push(
      element(
        'g',
        { class: 'wolf-pill', 'data-lower': formatSpelledPitch(w.lower), 'data-upper': formatSpelledPitch(w.upper), 'data-deviation': w.deviation.toFixed(3) },
        element('rect', { x, y, width: pill, height: 36, rx: 18, fill: 'none', stroke: c.wolf, 'stroke-width': 2.5 }) +
          text(x + pill / 2, y + 25, label, { 'font-size': 19, 'font-weight': 'bold', fill: c.wolf, 'text-anchor': 'middle' }),
      ),
    );
    x += pill + 12;
  }
  const height = y + (wolves.length > 0 ? 36 : 0) + 24;

  return (
    `<?xml version="1.0" encoding="UTF-8"?>\n` +
    `<svg xmlns="http://www.w3.org/2000/svg" width="${width}" height="${round(height)}" viewBox="0 0 ${width} ${round(height)}" font-family="${escapeXml(FONT)}" role="img">` +
    element('title', {}, escapeXml(`${options.title}: cents from 12-ET, fifths and thirds from pure, enharmonic gaps and wolves`)) +
    element('rect', { x: 0, y: 0, width, height, fill: c.ground }) +
    body.join('') +
    '</svg>\n'
  );
}
