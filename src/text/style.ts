/** ANSI styling that is a no-op when colour is off (not a TTY, NO_COLOR set, or --ascii output piped). */
export interface Style {
  readonly bold: (s: string) => string;
  readonly dim: (s: string) => string;
  readonly red: (s: string) => string;
  readonly yellow: (s: string) => string;
  readonly green: (s: string) => string;
  readonly cyan: (s: string) => string;
}

const wrap = (open: number, close: number) => (s: string) => `\u001b[${open}m${s}\u001b[${close}m`;
const plain = (s: string): string => s;

export function makeStyle(colour: boolean): Style {
  if (!colour) return { bold: plain, dim: plain, red: plain, yellow: plain, green: plain, cyan: plain };
  return { bold: wrap(1, 22), dim: wrap(2, 22), red: wrap(31, 39), yellow: wrap(33, 39), green: wrap(32, 39), cyan: wrap(36, 39) };
}

/** Colour only on a terminal, and never when NO_COLOR is set (no-color.org convention). */
export function wantsColour(stream: { isTTY?: boolean }): boolean {
  return stream.isTTY === true && !process.env['NO_COLOR'];
}

/** Width of a string as a terminal shows it: ANSI codes take none, each code point one column. */
export function displayWidth(s: string): number {
  // eslint-disable-next-line no-control-regex
  return [...s.replace(/\u001b\[[0-9;]*m/gu, '')].length;
}
