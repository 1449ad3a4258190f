import { formatPitchClass, formatSpelledPitch, type NameStyle } from '../pitch/index.js';
import { renderTable, signed } from '../text/table.js';
import type { Style } from '../text/style.js';
import { formatReference } from '../tuning/index.js';
import type { Chart, ChartInterval } from './chart.js';
import { outputNumber } from '../text/output-numbers.js';

export interface ChartTextOptions {
  readonly ascii: boolean;
  readonly style: Style;
  readonly title: string;
  readonly subtitle: string;
}

/** The chart as a terminal shows it: notes, enharmonic pairs, fifths and thirds. */
export function chartText(chart: Chart, options: ChartTextOptions): string {
  const { ascii, style } = options;
  const names: NameStyle = { accidentals: ascii ? 'ascii' : 'unicode' };
  const sign = (n: number, digits: number): string => signed(n, digits, ascii);
  const dash = ascii ? '-' : '–';
  /** A figure with a minus sign only when negative: the same minus sign as the signed columns. */
  const unsigned = (n: number, digits: number): string => (sign(n, digits).startsWith('+') || sign(n, digits).startsWith(' ') ? Math.abs(n).toFixed(digits) : sign(n, digits));
  const out: string[] = [];
  out.push(style.bold(options.title));
  out.push(style.dim(options.subtitle));
  out.push(style.dim(`reference ${formatReference(chart.reference, names)} Hz · origin ${formatPitchClass(chart.tuning.origin, names)} · octave ${chart.octave}`));
  out.push('');
  out.push(
    renderTable(
      [
        { header: 'note', align: 'left' },
        { header: 'fifths', align: 'right' },
        { header: 'cents', align: 'right' },
        { header: 'Hz', align: 'right' },
        { header: 'vs 12-ET', align: 'right' },
      ],
      chart.notes.map((n) => [
        formatSpelledPitch(n.pitch, names),
        sign(n.fifths, 0).trim(),
        unsigned(n.cents, 3),
        n.hz.toFixed(3),
        sign(n.etDeviation, 3),
      ]),
      style.bold,
    ),
  );
  if (chart.enharmonics.length > 0) {
    out.push('');
    out.push(style.bold('enharmonic pairs') + style.dim(' (sharpward minus flatward spelling)'));
    out.push(
      chart.enharmonics
        .map((e) => `${formatPitchClass(e.sharpward, names)}/${formatPitchClass(e.flatward, names)} ${sign(e.difference, 3)}`)
        .join('   '),
    );
  }
  const intervalTable = (kind: 'fifth' | 'third', heading: string): void => {
    const rows = chart.intervals.filter((i) => i.kind === kind);
    if (rows.length === 0) return;
    out.push('');
    out.push(style.bold(heading));
    out.push(
      renderTable(
        [
          { header: 'interval', align: 'left' },
          { header: 'quality', align: 'left' },
          { header: 'cents', align: 'right' },
          { header: 'pure', align: 'right' },
          { header: 'from pure', align: 'right' },
          { header: 'beats/s', align: 'right' },
          { header: '', align: 'left' },
        ],
        rows.map((i: ChartInterval) => {
          const cells = [
            `${formatSpelledPitch(i.lower, names)}${dash}${formatSpelledPitch(i.upper, names)}`,
            i.quality,
            unsigned(i.cents, 3),
            `${i.pure.p}/${i.pure.q}`,
            sign(i.deviation, 3),
            i.beats.toFixed(2),
            i.wolf ? 'wolf' : '',
          ];
          return i.wolf ? cells.map(style.red) : cells;
        }),
        style.bold,
      ),
    );
  };
  intervalTable('fifth', 'fifths (7 keys apart)');
  intervalTable('third', 'major thirds (4 keys apart)');
  const wolves = chart.intervals.filter((i) => i.wolf).length;
  out.push('');
  out.push(
    style.dim(
      `wolves: ${wolves} (a fifth more than ${chart.wolfLimits.fifth} cents or a third more than ${chart.wolfLimits.third} cents from pure)`,
    ),
  );
  return out.join('\n') + '\n';
}

function csvCell(s: string | number): string {
  const text = String(s);
  return /[",\n]/u.test(text) ? `"${text.replace(/"/gu, '""')}"` : text;
}

/** The notes (`notes`) or the intervals (`intervals`) as CSV with a header row, figures rounded as in the JSON. */
export function chartCsv(chart: Chart, table: 'notes' | 'intervals'): string {
  const c = (n: number): number => outputNumber(n, 'cents');
  const rows: (string | number)[][] =
    table === 'notes'
      ? [
          ['name', 'fifths', 'cents', 'hz', 'etDeviation'],
          ...chart.notes.map((n) => [formatSpelledPitch(n.pitch), n.fifths, c(n.cents), outputNumber(n.hz, 'hz'), c(n.etDeviation)]),
        ]
      : [
          ['kind', 'quality', 'lower', 'upper', 'cents', 'pure', 'deviation', 'beats', 'wolf'],
          ...chart.intervals.map((i) => [
            i.kind,
            i.quality,
            formatSpelledPitch(i.lower),
            formatSpelledPitch(i.upper),
            c(i.cents),
            `${i.pure.p}/${i.pure.q}`,
            c(i.deviation),
            outputNumber(i.beats, 'beats'),
            String(i.wolf),
          ]),
        ];
  return rows.map((r) => r.map(csvCell).join(',')).join('\n') + '\n';
}
