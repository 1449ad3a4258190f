/**
 * Numbers as diesis prints them in JSON and CSV. The core keeps exact values (and floats only
 * where a float is asked for); at the output boundary a figure is rounded to what a listener or a
 * script can use, so 700.0000000000003 cents prints as 700 and 175.99999999999997 Hz as 176.
 */

/** Decimal places of each kind of figure: a ten-thousandth of a cent, a micro-hertz, a microsecond. */
export const OUTPUT_DECIMALS = {
  cents: 4,
  hz: 6,
  seconds: 6,
  milliseconds: 3,
  beats: 4,
} as const;

export type OutputQuantity = keyof typeof OUTPUT_DECIMALS;

/**
 * `value` rounded half away from zero at `decimals` places of its own binary value (as `toFixed`
 * rounds), with −0 printed as 0. Non-finite values are returned as they are.
 */
export function roundTo(value: number, decimals: number): number {
  if (!Number.isFinite(value)) return value;
  const rounded = Number(value.toFixed(decimals));
  return rounded === 0 ? 0 : rounded;
}

/** A figure of the given kind rounded for output (see `OUTPUT_DECIMALS`). */
export function outputNumber(value: number, quantity: OutputQuantity): number {
  return roundTo(value, OUTPUT_DECIMALS[quantity]);
}
