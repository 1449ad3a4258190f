import { displayWidth } from './style.js';

export interface Column {
  readonly header: string;
  readonly align: 'left' | 'right';
}

function pad(cell: string, width: number, align: 'left' | 'right'): string {
  const fill = ' '.repeat(Math.max(0, width - displayWidth(cell)));
  return align === 'left' ? cell + fill : fill + cell;
}

/** Aligned columns separated by two spaces; `headerStyle` styles the header row. */
export function renderTable(columns: readonly Column[], rows: readonly (readonly string[])[], headerStyle: (s: string) => string = (s) => s): string {
  const widths = columns.map((c, i) => Math.max(displayWidth(c.header), ...rows.map((r) => displayWidth(r[i] ?? ''))));
  const line = (cells: readonly string[]): string =>
    columns.map((c, i) => pad(cells[i] ?? '', widths[i] ?? 0, c.align)).join('  ').trimEnd();
  return [headerStyle(line(columns.map((c) => c.header))), ...rows.map(line)].join('\n');
}

/** A signed number with a real minus sign: `+5.377`, `−41.059`. */
export function signed(n: number, digits: number, ascii = false): string {
  const text = Math.abs(n).toFixed(digits);
  if (Number(text) === 0) return ` ${text}`;
  return (n < 0 ? (ascii ? '-' : '−') : '+') + text;
}
