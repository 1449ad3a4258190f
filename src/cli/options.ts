import { UserError } from '../util/errors.js';

/** Commander argument parsers that fail with one clear line naming the option. */
export function integerOption(name: string, min: number, max: number) {
  return (text: string): number => {
    const n = Number(text);
    if (!/^-?\d+$/u.test(text.trim()) || n < min || n > max) throw new UserError(`${name} "${text}" must be a whole number from ${min} to ${max}`, 2);
    return n;
  };
}

export function numberOption(name: string, min: number, max: number) {
  return (text: string): number => {
    const n = Number(text);
    if (text.trim() === '' || !Number.isFinite(n) || n < min || n > max) throw new UserError(`${name} "${text}" must be a number from ${min} to ${max}`, 2);
    return n;
  };
}
