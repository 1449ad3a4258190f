import Fraction from 'fraction.js';

/**
 * An exact frequency ratio written as a product of prime powers with rational exponents:
 * 3/2 is 2^−1·3^1, quarter-comma meantone's fifth is 5^(1/4), a step of 31-EDO is 2^(1/31).
 * Products, quotients and rational powers stay exact; a float appears only when asked for
 * (`cents`, `value`). When every exponent is an integer the ratio is rational (`toFraction`).
 */
export interface PitchRatio {
  /** Prime → exponent, primes ascending, no zero exponents. */
  readonly factors: ReadonlyArray<readonly [prime: bigint, exponent: Fraction]>;
}

const ZERO = new Fraction(0);
export const UNISON: PitchRatio = { factors: [] };

function normalise(map: Map<bigint, Fraction>): PitchRatio {
  const factors = [...map.entries()]
    .filter(([, e]) => !e.equals(ZERO))
    .sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0));
  return { factors };
}

function factorInteger(n: bigint, into: Map<bigint, Fraction>, sign: 1 | -1): void {
  let rest = n;
  const add = (p: bigint): void => {
    into.set(p, (into.get(p) ?? ZERO).add(sign));
  };
  for (let p = 2n; p * p <= rest; p += p === 2n ? 1n : 2n) {
    while (rest % p === 0n) {
      add(p);
      rest /= p;
    }
  }
  if (rest > 1n) add(rest);
}

/** The exact ratio of a positive fraction (`"81/80"`, `3`, `[5, 4]`). */
export function ratio(value: Fraction | string | number | readonly [number, number]): PitchRatio {
  const f = value instanceof Fraction ? value : Array.isArray(value) ? new Fraction(value[0], value[1]) : new Fraction(value as string | number);
  if (f.s < 0n || f.n === 0n) throw new RangeError(`a frequency ratio must be positive, got ${f.toFraction()}`);
  const map = new Map<bigint, Fraction>();
  factorInteger(f.n, map, 1);
  factorInteger(f.d, map, -1);
  return normalise(map);
}

/** 2^(cents/1200), exact when `cents` is given as a decimal string or a Fraction. */
export function fromCents(cents: Fraction | string | number): PitchRatio {
  const c = cents instanceof Fraction ? cents : new Fraction(typeof cents === 'number' ? String(cents) : cents);
  return normalise(new Map([[2n, c.div(1200)]]));
}

export function multiply(a: PitchRatio, b: PitchRatio): PitchRatio {
  const map = new Map<bigint, Fraction>(a.factors.map(([p, e]) => [p, e]));
  for (const [p, e] of b.factors) map.set(p, (map.get(p) ?? ZERO).add(e));
  return normalise(map);
}

export function power(a: PitchRatio, exponent: Fraction | number): PitchRatio {
  const k = exponent instanceof Fraction ? exponent : new Fraction(exponent);
  return normalise(new Map(a.factors.map(([p, e]) => [p, e.mul(k)])));
}

export function divide(a: PitchRatio, b: PitchRatio): PitchRatio {
  return multiply(a, power(b, -1));
}

export function ratioEquals(a: PitchRatio, b: PitchRatio): boolean {
  return a.factors.length === b.factors.length && a.factors.every(([p, e], i) => {
    const other = b.factors[i];
    return other !== undefined && other[0] === p && other[1].equals(e);
  });
}

export function isRational(a: PitchRatio): boolean {
  return a.factors.every(([, e]) => e.d === 1n);
}

/** The ratio as an exact fraction, or undefined when it is irrational (a tempered size). */
export function toFraction(a: PitchRatio): Fraction | undefined {
  if (!isRational(a)) return undefined;
  let n = 1n;
  let d = 1n;
  for (const [p, e] of a.factors) {
    const k = e.n; // integer exponent, sign in e.s
    if (e.s > 0n) n *= p ** k;
    else d *= p ** k;
  }
  return new Fraction(n, d);
}

/** log2 of the ratio, as a float. */
export function octaves(a: PitchRatio): number {
  let sum = 0;
  for (const [p, e] of a.factors) sum += e.valueOf() * Math.log2(Number(p));
  return sum;
}

export function cents(a: PitchRatio): number {
  return 1200 * octaves(a);
}

export function value(a: PitchRatio): number {
  const exact = toFraction(a);
  return exact !== undefined ? exact.valueOf() : 2 ** octaves(a);
}

/** A readable exact form: `3/2`, `5^(1/4)`, `2^(18/31)`, `3^4·5^(-1/4)/2^2`. */
export function formatRatio(a: PitchRatio): string {
  const exact = toFraction(a);
  if (exact !== undefined) return exact.toFraction();
  return a.factors
    .map(([p, e]) => (e.equals(1) ? `${p}` : e.d === 1n ? `${p}^${e.toFraction()}` : `${p}^(${e.toFraction()})`))
    .join('·');
}
