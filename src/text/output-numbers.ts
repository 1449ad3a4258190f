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

/**
 * Significant digits of a frequency that diesis writes and reads back to compare in cents: a
 * sample set's manifest.json, whose frequencies are checked against the tuning to 0.01 cent when
 * the set is played. Ten digits leave a relative error of at most 5·10⁻¹⁰, under 0.000001 cent, at
 * any frequency; a fixed number of places cannot promise that for a very low set (micro-hertz,
 * the `hz` places above, is already 0.04 cent off at 0.02 Hz, which a reference of A4 = 1 Hz allows).
 */
export const RECORDED_HZ_DIGITS = 10;

/**
 * `value` rounded to `digits` significant digits of its own binary value (as `toPrecision` rounds),
 * with −0 given as 0. Non-finite values are returned as they are.
 */
export function roundSignificant(value: number, digits: number): number {
  if (!Number.isFinite(value)) return value;
  const rounded = Number(value.toPrecision(digits));
  return rounded === 0 ? 0 : rounded;
}
