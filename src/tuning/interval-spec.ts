import Fraction from 'fraction.js';
import { UserError } from '../util/errors.js';
import { divide, fromCents, multiply, power, ratio, type PitchRatio } from './ratio.js';

/** Named commas a size may be tempered by. */
export const COMMAS = {
  syntonic: ratio('81/80'),
  pythagorean: ratio('531441/524288'),
  schisma: ratio('32805/32768'),
  diaschisma: ratio('2048/2025'),
  diesis: ratio('128/125'),
  septimal: ratio('64/63'),
} as const satisfies Record<string, PitchRatio>;
export type CommaName = keyof typeof COMMAS;

export const PURE_FIFTH = ratio('3/2');

/**
 * How a preset writes an interval (a fifth, usually):
 * - `"pure"`: 3/2;
 * - `"-1/4 syntonic"`: a pure fifth narrowed by a quarter of the syntonic comma (a comma may also be a ratio, `"-1/6 531441/524288"`);
 * - `{ "ratio": "3/2", "temper": "-1/4 syntonic" }`: any exact ratio, optionally tempered;
 * - `{ "cents": 696.578 }`: a size in cents;
 * - `{ "edo": 31, "steps": 18 }`: steps of an equal division of the octave (`steps` defaults to the best fifth).
 */
export type IntervalSpec =
  | string
  | { readonly ratio: string; readonly temper?: string | undefined }
  | { readonly cents: number | string }
  | { readonly edo: number; readonly steps?: number | undefined };

function parseComma(text: string, where: string): PitchRatio {
  if (text in COMMAS) return COMMAS[text as CommaName];
  if (/^\d+(\/\d+)?$/u.test(text)) return ratio(text);
  throw new UserError(`${where}: unknown comma "${text}" (use ${Object.keys(COMMAS).join(', ')}, or a ratio such as 81/80)`);
}

/** `"-1/4 syntonic"` → (81/80)^(−1/4). */
export function parseTemper(text: string, where: string): PitchRatio {
  const match = /^\s*([+-]?\d+(?:\/\d+)?)\s+(\S+)\s*$/u.exec(text);
  if (!match) throw new UserError(`${where}: "${text}" is not a tempering; write a signed fraction of a comma, as in "-1/4 syntonic"`);
  const [, amount = '', comma = ''] = match;
  return power(parseComma(comma, where), new Fraction(amount));
}

function parseRatioText(text: string, where: string): PitchRatio {
  if (!/^\s*\d+\s*(\/\s*\d+\s*)?$/u.test(text) || /^\s*0+\s*(\/|$)/u.test(text)) {
    throw new UserError(`${where}: "${text}" is not a positive ratio such as 3/2`);
  }
  return ratio(text.replace(/\s+/gu, ''));
}

/** The best fifth of n-EDO: the step count nearest to 3/2. */
export function edoFifthSteps(divisions: number): number {
  return Math.round(divisions * Math.log2(1.5));
}

export function intervalFromSpec(spec: IntervalSpec, where: string): PitchRatio {
  if (typeof spec === 'string') {
    return spec.trim() === 'pure' ? PURE_FIFTH : multiply(PURE_FIFTH, parseTemper(spec, where));
  }
  if ('ratio' in spec) {
    const base = parseRatioText(spec.ratio, where);
    return spec.temper === undefined ? base : multiply(base, parseTemper(spec.temper, where));
  }
  if ('cents' in spec) {
    const text = String(spec.cents);
    if (!/^-?\d+(\.\d+)?$/u.test(text)) throw new UserError(`${where}: cents "${text}" is not a decimal number`);
    return fromCents(text);
  }
  if (!Number.isInteger(spec.edo) || spec.edo < 1) throw new UserError(`${where}: edo must be a positive whole number, got ${spec.edo}`);
  const steps = spec.steps ?? edoFifthSteps(spec.edo);
  return fromCents(new Fraction(1200 * steps, spec.edo));
}

/** Convenience for code and tests: the fifth of `fraction`-comma meantone, 3/2 · (81/80)^(−fraction). */
export function meantoneFifth(fraction: string): PitchRatio {
  return divide(PURE_FIFTH, power(COMMAS.syntonic, new Fraction(fraction)));
}
