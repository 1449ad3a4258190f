import Fraction from 'fraction.js';
import { UserError } from '../util/errors.js';
import { cents, divide, fromCents, multiply, power, ratio, type PitchRatio } from './ratio.js';

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

/**
 * Bounds on what a preset may write, so that no number a user gives makes a loop run long:
 * ratio terms have at most 12 digits (they are factored by trial division), tempering amounts
 * at most 9, and every interval lies within four octaves either way.
 */
export const SPEC_LIMITS = { ratioDigits: 12, amountDigits: 9, cents: 4800, edo: 10_000 } as const;

function checkSize(size: PitchRatio, where: string, text: string): PitchRatio {
  const c = cents(size);
  if (!Number.isFinite(c) || Math.abs(c) > SPEC_LIMITS.cents) {
    throw new UserError(`${where}: ${text} comes to ${Number.isFinite(c) ? `${Math.round(c)} cents` : 'no finite size'}; an interval here must lie within ±${SPEC_LIMITS.cents} cents (four octaves)`);
  }
  return size;
}

const RATIO_TERM = `\\d{1,${SPEC_LIMITS.ratioDigits}}`;

function parseComma(text: string, where: string): PitchRatio {
  if (text in COMMAS) return COMMAS[text as CommaName];
  if (new RegExp(`^${RATIO_TERM}(/${RATIO_TERM})?$`, 'u').test(text) && !/^0+(\/|$)/u.test(text) && !/\/0+$/u.test(text)) return ratio(text);
  throw new UserError(`${where}: unknown comma "${text}" (use ${Object.keys(COMMAS).join(', ')}, or a ratio such as 81/80)`);
}

/** `"-1/4 syntonic"` → (81/80)^(−1/4). */
export function parseTemper(text: string, where: string): PitchRatio {
  const match = /^\s*([+-]?\d+(?:\/\d+)?)\s+(\S+)\s*$/u.exec(text);
  if (!match) throw new UserError(`${where}: "${text}" is not a tempering; write a signed fraction of a comma, as in "-1/4 syntonic"`);
  const [, amount = '', comma = ''] = match;
  if (amount.replace(/^[+-]/u, '').split('/').some((n) => n.length > SPEC_LIMITS.amountDigits)) {
    throw new UserError(`${where}: "${amount}" has more than ${SPEC_LIMITS.amountDigits} digits; write a small fraction of a comma, as in "-1/4 syntonic"`);
  }
  if (/\/0+$/u.test(amount)) throw new UserError(`${where}: "${amount}" divides by zero`);
  return checkSize(power(parseComma(comma, where), new Fraction(amount)), where, `"${text}"`);
}

function parseRatioText(text: string, where: string): PitchRatio {
  if (!/^\s*\d+\s*(\/\s*\d+\s*)?$/u.test(text) || /^\s*0+\s*(\/|$)/u.test(text) || /\/\s*0+\s*$/u.test(text)) {
    throw new UserError(`${where}: "${text}" is not a positive ratio such as 3/2`);
  }
  if (text.split('/').some((n) => n.trim().length > SPEC_LIMITS.ratioDigits)) {
    throw new UserError(`${where}: "${text}" has a term of more than ${SPEC_LIMITS.ratioDigits} digits; write a ratio of smaller whole numbers`);
  }
  return checkSize(ratio(text.replace(/\s+/gu, '')), where, `"${text}"`);
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
    if (Math.abs(Number(text)) > SPEC_LIMITS.cents) throw new UserError(`${where}: cents ${text} is outside ±${SPEC_LIMITS.cents} (four octaves)`);
    return fromCents(text.replace(/(\.\d{12})\d+$/u, '$1')); // 12 decimals are far below any audible difference
  }
  if (!Number.isInteger(spec.edo) || spec.edo < 1 || spec.edo > SPEC_LIMITS.edo) throw new UserError(`${where}: edo must be a whole number from 1 to ${SPEC_LIMITS.edo}, got ${spec.edo}`);
  const steps = spec.steps ?? edoFifthSteps(spec.edo);
  if (!Number.isInteger(steps) || Math.abs(steps) > 4 * spec.edo) throw new UserError(`${where}: steps must be a whole number within four octaves (±${4 * spec.edo} steps of ${spec.edo}-EDO), got ${steps}`);
  return fromCents(new Fraction(1200 * steps, spec.edo));
}

/** Convenience for code and tests: the fifth of `fraction`-comma meantone, 3/2 · (81/80)^(−fraction). */
export function meantoneFifth(fraction: string): PitchRatio {
  return divide(PURE_FIFTH, power(COMMAS.syntonic, new Fraction(fraction)));
}
